// Rillbook — Nuxt configuration. Secrets never go in the `auth` block (it is public runtime config).
export default defineNuxtConfig({
  compatibilityDate: '2026-11-01',
  devtools: { enabled: false },
  telemetry: false,
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', '@sidebase/nuxt-auth'],
  css: ['~/assets/css/main.css'],
  app: {
    head: {
      title: 'Rillbook',
      htmlAttrs: { lang: 'en' },
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'theme-color', content: '#0f5c57' },
      ],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }],
    },
  },
  runtimeConfig: {
    // Filled from NUXT_DATABASE_URL or DATABASE_URL (see server/utils/db.ts).
    databaseUrl: '',
    sessionTtlHours: 12,
    public: {
      productName: 'Rillbook',
    },
  },
  auth: {
    isEnabled: true,
    disableServerSideAuth: false,
    originEnvKey: 'AUTH_ORIGIN',
    baseURL: '/api/auth',
    globalAppMiddleware: true,
    provider: {
      type: 'local',
      endpoints: {
        signIn: { path: '/login', method: 'post' },
        signOut: { path: '/logout', method: 'post' },
        signUp: false,
        getSession: { path: '/session', method: 'get' },
      },
      token: {
        signInResponseTokenPointer: '/token',
        type: 'Bearer',
        cookieName: 'auth.token',
        headerName: 'Authorization',
        maxAgeInSeconds: 12 * 60 * 60,
        sameSiteAttribute: 'lax',
        secureCookieAttribute: false,
      },
      session: {
        dataType: {
          id: 'string',
          email: 'string',
          name: 'string',
          role: '\'owner\' | \'technician\' | \'customer\'',
          customerId: 'string | null',
        },
      },
    },
    sessionRefresh: { enablePeriodically: false, enableOnWindowFocus: false },
  },
  tailwindcss: {
    cssPath: false,
    viewer: false,
  },
  nitro: {
    experimental: { tasks: true },
    // The invoice PDF's font files are read at run time: copy them into .output with the server.
    externals: {
      traceInclude: ['@fontsource/work-sans/files/work-sans-latin-400-normal.woff', '@fontsource/work-sans/files/work-sans-latin-600-normal.woff'],
    },
    scheduledTasks: {
      '* * * * *': ['mail:flush'],
      // The alert scan every ten minutes (its cost follows new readings; it runs once across instances).
      '*/10 * * * *': ['alerts:scan'],
      // Billing once a day (UTC; each company's own date decides what is due). Once across instances.
      '15 11 * * *': ['billing:renew'],
    },
  },
  typescript: {
    strict: true,
  },
})

// Nuxt 4.4's schema types the `nitro` block with a narrow fallback unless the builder registers
// its config type; register Nitro 2's so scheduled tasks type-check.
declare module '@nuxt/schema' {
  interface NitroTypes {
    config: import('nitropack').NitroConfig
  }
}
