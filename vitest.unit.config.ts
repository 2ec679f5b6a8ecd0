import { defineConfig } from 'vitest/config'

// The unit tests alone (pure code, no server or browser): what mutation testing runs (stryker.config.json).
export default defineConfig({
  test: {
    include: ['tests/unit/**/*.test.ts'],
    environment: 'node',
  },
})
