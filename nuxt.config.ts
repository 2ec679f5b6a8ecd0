// Rillbook — Nuxt configuration. Secrets never go in the `auth` block (it is public runtime config).
export default defineNuxtConfig({
  compatibilityDate: '2026-11-01',
  devtools: { enabled: false },
  // RILLBOOK_DEBUG_HYDRATION=1 at build time makes Vue name what differs in a hydration mismatch
  // (the browser tests fail on any; this tells you where).
  debug: process.env.RILLBOOK_DEBUG_HYDRATION === '1' ? { hydration: true } : false,
  telemetry: false,
  modules: ['@nuxt/eslint', '@nuxtjs/tailwindcss', '@pinia/nuxt', '@sidebase/nuxt-auth', 'nuxt-security'],
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
      // The session token lives only in the server's HttpOnly `auth.token` cookie (set at sign-in,
      // see server/utils/auth.ts). nuxt-auth keeps a non-secret marker instead ("cookie", from the
      // sign-in answer's `session`) in its own script-readable cookie, and sends it in a header the
      // server ignores; the browser sends the HttpOnly cookie with every same-site request.
      token: {
        signInResponseTokenPointer: '/session',
        type: '',
        cookieName: 'auth.session',
        headerName: 'X-Rillbook-Session',
        maxAgeInSeconds: 12 * 60 * 60,
        sameSiteAttribute: 'lax',
        // Secure when served over TLS (set RILLBOOK_SECURE_COOKIES=1 when building for HTTPS).
        secureCookieAttribute: process.env.RILLBOOK_SECURE_COOKIES === '1',
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
  // Security headers with a nonce-based CSP (nuxt-security), and request size limits. Cross-site
  // request forgery is refused by server/middleware/csrf.ts; sign-in limits live in the sign-in service.
  security: {
    nonce: true,
    sri: true,
    // Server logs are ours (tasks, errors): keep console calls.
    removeLoggers: false,
    headers: {
      contentSecurityPolicy: {
        'base-uri': ["'none'"],
        'default-src': ["'self'"],
        'connect-src': ["'self'"],
        'font-src': ["'self'", 'data:'],
        'form-action': ["'self'"],
        'frame-ancestors': ["'none'"],
        // The visit-report e-mail is shown in a sandboxed srcdoc frame.
        'frame-src': ["'self'"],
        'img-src': ["'self'", 'data:', 'blob:'],
        'object-src': ["'none'"],
        'script-src-attr': ["'none'"],
        // Vue and the charts set inline styles.
        'style-src': ["'self'", "'unsafe-inline'"],
        'script-src': ["'self'", "'strict-dynamic'", "'nonce-{{nonce}}'"],
        'worker-src': ["'self'", 'blob:'],
        // The demo is served over plain HTTP on loopback; behind TLS the proxy upgrades.
        'upgrade-insecure-requests': false,
      },
      crossOriginEmbedderPolicy: 'unsafe-none',
      xFrameOptions: 'DENY',
      referrerPolicy: 'same-origin',
      permissionsPolicy: { 'camera': ['self'], 'display-capture': [], 'fullscreen': [], 'geolocation': [], 'microphone': [] },
    },
    requestSizeLimiter: {
      // JSON bodies up to 1 MB; photo uploads (multipart) up to 16 MB.
      maxRequestSizeInBytes: 1_000_000,
      maxUploadFileRequestInBytes: 16_000_000,
      throwError: true,
    },
    // Sign-in has its own per-account and per-address limits; a global limiter would throttle a
    // technician's phone catching up after a dead zone.
    rateLimiter: false,
    // Input is validated by zod and every output is escaped; this filter would refuse honest notes.
    xssValidator: false,
    corsHandler: false,
  },
  // JSON answers carry no scripts: no CSP nonce to make for them (pages keep theirs).
  routeRules: {
    '/api/**': { security: { nonce: false } },
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
