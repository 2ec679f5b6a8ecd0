import type { Config } from 'tailwindcss'

// Rillbook's own palette: deep pond teal, reed green, clay for attention, a warm stone neutral.
export default {
  content: ['./app/**/*.{vue,ts}', './shared/types/billing.ts'],
  theme: {
    extend: {
      fontFamily: {
        sans: ['"Work Sans"', 'system-ui', 'sans-serif'],
      },
      colors: {
        pond: {
          50: '#effaf8', 100: '#d5f1ec', 200: '#aee2da', 300: '#7bcbc1', 400: '#4aaea4',
          500: '#2f928a', 600: '#237570', 700: '#1d5f5b', 800: '#0f5c57', 900: '#0c3f3c', 950: '#062624',
        },
        reed: { 50: '#f4f8ec', 100: '#e5efd3', 300: '#b5cf83', 500: '#7a9a3c', 700: '#4e6426', 900: '#2c3816' },
        clay: { 50: '#fdf4ee', 100: '#fae3d3', 300: '#eeaa7d', 500: '#d56f32', 700: '#9c4617', 900: '#5a280c' },
        stone: {
          50: '#faf9f7', 100: '#f2f0ec', 200: '#e4e0d9', 300: '#cdc7bd', 400: '#a59d90',
          500: '#7f776b', 600: '#625b51', 700: '#4b463e', 800: '#33302b', 900: '#1f1d1a',
        },
        alert: { 50: '#fdf2f2', 500: '#c0392b', 700: '#8e2418' },
      },
      fontSize: {
        // A 1.2 type scale with roomy line heights for reading outdoors on a phone.
        'xs': ['0.75rem', { lineHeight: '1.1rem' }],
        'sm': ['0.875rem', { lineHeight: '1.3rem' }],
        'base': ['1rem', { lineHeight: '1.55rem' }],
        'lg': ['1.2rem', { lineHeight: '1.75rem' }],
        'xl': ['1.44rem', { lineHeight: '2rem' }],
        '2xl': ['1.728rem', { lineHeight: '2.3rem' }],
        '3xl': ['2.074rem', { lineHeight: '2.6rem' }],
      },
      borderRadius: { card: '0.9rem' },
    },
  },
} satisfies Config
