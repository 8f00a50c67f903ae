import { cpSync, existsSync } from 'node:fs'
import { resolve } from 'node:path'

// Sets html.dark before the page paints: the person's choice on this device (localStorage), else the phone's setting.
const APPEARANCE_SCRIPT = `try{var m=localStorage.getItem('forescent-appearance');if(m==='dark'||(m!=='light'&&matchMedia('(prefers-color-scheme: dark)').matches))document.documentElement.classList.add('dark')}catch(e){}`

// Forescent: Nuxt at the repository root (no app/ folder, so the root is the source folder).
export default defineNuxtConfig({
  compatibilityDate: '2026-11-01',
  devtools: { enabled: false },
  // Separate build folders let several checkouts or helpers build side by side (default .nuxt and .output).
  buildDir: process.env.NUXT_BUILD_DIR || '.nuxt',
  telemetry: false,
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', 'pinia-plugin-persistedstate/nuxt', 'nuxt-auth-utils', 'nuxt-security', '@vite-pwa/nuxt', '@nuxt/eslint'],
  css: ['@fontsource-variable/inter/index.css', '~/assets/css/main.css', '~/assets/css/dark.css'],
  tailwindcss: { configPath: 'tailwind.config.ts', cssPath: false },
  app: {
    head: {
      htmlAttrs: { lang: 'en-GB' },
      title: 'Forescent',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1, viewport-fit=cover' },
        { name: 'theme-color', content: '#1f4d45' },
      ],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }, { rel: 'apple-touch-icon', href: '/apple-touch-icon.png' }],
      // The dark appearance before the first paint (no light flash at night): the choice kept on this device, else the
      // phone's setting. plugins/appearance.client.ts keeps it up to date afterwards.
      script: [{ innerHTML: APPEARANCE_SCRIPT, tagPosition: 'head' }],
    },
  },
  // Installable on a phone's home screen, and the app's screens open with no signal after one visit (docs/offline.md).
  pwa: {
    registerType: 'prompt', // a new version waits until the person taps "Update" (components/app/AppUpdateNotice.vue)
    injectRegister: false,
    client: { installPrompt: false, periodicSyncForUpdates: 60 * 60 },
    manifest: {
      // W3C Web App Manifest fields; the name and colours are our own.
      id: '/',
      name: 'Forescent',
      short_name: 'Forescent',
      description: 'Alert diary, scent samples, training and homework for medical alert dog programmes.',
      lang: 'en-GB',
      start_url: '/', // the global middleware sends each person to their own area's home
      scope: '/',
      display: 'standalone',
      theme_color: '#1f4d45',
      background_color: '#fbf9f5',
      icons: [
        { src: '/icon-192.png', sizes: '192x192', type: 'image/png' },
        { src: '/icon-512.png', sizes: '512x512', type: 'image/png' },
        { src: '/icon-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
        { src: '/favicon.svg', sizes: 'any', type: 'image/svg+xml' },
      ],
    },
    workbox: {
      // The shell (scripts, styles, fonts, icons) is kept ahead; pages are kept as they are visited.
      globPatterns: ['**/*.{js,css,woff2,svg,png}'],
      navigateFallback: null,
      cleanupOutdatedCaches: true,
      runtimeCaching: [{
        // Screens: the network first (always fresh with a signal), the last copy of that screen without one.
        urlPattern: ({ request, url }) => request.mode === 'navigate' && !url.pathname.startsWith('/api/'),
        handler: 'NetworkFirst',
        options: {
          cacheName: 'forescent-pages',
          networkTimeoutSeconds: 6, // a weak signal falls back to the kept screen after this long (common practice)
          cacheableResponse: { statuses: [200] },
          expiration: { maxEntries: 60, maxAgeSeconds: 60 * 60 * 24 * 14 },
        },
      }],
    },
    devOptions: { enabled: false }, // no worker in `npm run dev` (it would keep stale pages while editing)
  },
  runtimeConfig: {
    // Each value can be set with NUXT_<NAME> at run time; see README "Configuration".
    databaseUrl: '',
    databaseAuthToken: '',
    smtpHost: '127.0.0.1',
    smtpPort: 2525,
    smtpSecure: false,
    smtpUser: '',
    smtpPass: '',
    mailFrom: 'Forescent <no-reply@forescent.test>',
    appUrl: 'http://localhost:3000',
    // Idle and absolute session lifetimes in seconds (common practice for business web apps).
    sessionIdleSeconds: 60 * 60 * 2,
    sessionAbsoluteSeconds: 60 * 60 * 12,
    outboxIntervalMs: 2000,
    session: {
      name: 'forescent-session',
      maxAge: 60 * 60 * 12,
      cookie: { sameSite: 'lax' },
    },
  },
  // Browser security headers through nuxt-security (docs/security.md "Headers"). Its request-size limiter, rate
  // limiter, XSS filter and CORS handler are off: server/middleware does those for this app (body classes, throttle,
  // origin check), and nothing cross-origin calls us.
  security: {
    nonce: true,
    sri: true,
    removeLoggers: false,
    rateLimiter: false,
    xssValidator: false,
    requestSizeLimiter: false,
    corsHandler: false,
    allowedMethodsRestricter: false,
    hidePoweredBy: true,
    headers: {
      contentSecurityPolicy: {
        'default-src': ["'self'"],
        'base-uri': ["'none'"],
        'object-src': ["'none'"],
        // Nuxt's own inline scripts carry the per-request nonce; the bundles they load are trusted through it.
        'script-src': ["'self'", "'strict-dynamic'", "'nonce-{{nonce}}'"],
        'script-src-attr': ["'none'"],
        // Vue and the charts set style attributes; inline styles cannot run code (an accepted gap, docs/security.md).
        'style-src': ["'self'", "'unsafe-inline'"],
        'img-src': ["'self'", 'data:', 'blob:'],
        // Homework videos play from our routes, and from the phone's own file before it is sent (blob:).
        'media-src': ["'self'", 'blob:'],
        'font-src': ["'self'"],
        'connect-src': ["'self'"],
        'worker-src': ["'self'"],
        'manifest-src': ["'self'"],
        'frame-src': ["'none'"],
        'frame-ancestors': ["'none'"],
        'form-action': ["'self'"],
        // Served over plain HTTP in development and tests; production sits behind TLS with HSTS below.
        'upgrade-insecure-requests': false,
      },
      xFrameOptions: 'DENY',
      referrerPolicy: 'no-referrer',
      // One year (OWASP HTTP Headers Cheat Sheet); browsers ignore it over plain HTTP.
      strictTransportSecurity: { maxAge: 31536000, includeSubdomains: true },
      crossOriginEmbedderPolicy: 'unsafe-none',
      permissionsPolicy: {
        'camera': [],
        'microphone': [],
        'geolocation': [],
        'display-capture': [],
        'payment': [],
        'usb': [],
        // Homework videos may go full screen.
        'fullscreen': ['self'],
      },
    },
  },
  routeRules: {
    // API answers carry health and payment data: never kept by a browser or a shared cache.
    '/api/**': { headers: { 'cache-control': 'no-store' } },
  },
  nitro: {
    // useEvent() anywhere in a request (the logger puts the request id on every line; a request key is marked
    // inside its record's transaction).
    experimental: { tasks: false, asyncContext: true },
    output: { dir: process.env.NUXT_OUTPUT_DIR || '.output' },
    imports: { dirs: ['server/services'] },
    hooks: {
      // drizzle-kit's migrations are not bundled; copy them beside the built server so start-up can apply them.
      compiled(nitro) {
        const from = resolve(nitro.options.rootDir, 'server/database/migrations')
        const to = resolve(nitro.options.output.serverDir, 'database/migrations')
        if (existsSync(from)) cpSync(from, to, { recursive: true })
      },
    },
  },
  typescript: { strict: true },
})
