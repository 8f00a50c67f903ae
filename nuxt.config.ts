import { cpSync, existsSync } from 'node:fs'
import { resolve } from 'node:path'

// Forescent: Nuxt at the repository root (no app/ folder, so the root is the source folder).
export default defineNuxtConfig({
  compatibilityDate: '2026-11-01',
  devtools: { enabled: false },
  // Separate build folders let several checkouts or helpers build side by side (default .nuxt and .output).
  buildDir: process.env.NUXT_BUILD_DIR || '.nuxt',
  telemetry: false,
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', 'pinia-plugin-persistedstate/nuxt', 'nuxt-auth-utils'],
  css: ['@fontsource-variable/inter/index.css', '~/assets/css/main.css'],
  tailwindcss: { configPath: 'tailwind.config.ts', cssPath: false },
  app: {
    head: {
      htmlAttrs: { lang: 'en-GB' },
      title: 'Forescent',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1, viewport-fit=cover' },
        { name: 'theme-color', content: '#1f4d45' },
      ],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }],
    },
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
  nitro: {
    output: { dir: process.env.NUXT_OUTPUT_DIR || '.output' },
    imports: { dirs: ['server/services'] },
    experimental: { tasks: false },
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
