// Nuxt configuration: the root is the source folder (no app/ folder), see DEVELOPERS.md.
import { createRequire } from 'node:module'
import { dirname, join } from 'node:path'

// Nuxt's own error handler (it renders error.vue), which Nuxt adds only when no handler is configured.
const nuxtErrorHandler = join(dirname(createRequire(createRequire(import.meta.url).resolve('nuxt/package.json')).resolve('@nuxt/nitro-server')), 'runtime/handlers/error')

export default defineNuxtConfig({
  modules: ['@pinia/nuxt', '@nuxtjs/tailwindcss', '@sidebase/nuxt-auth', '@nuxt/eslint'],
  devtools: { enabled: false },
  app: {
    head: {
      htmlAttrs: { lang: 'en' },
      title: 'Torquewright',
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'description', content: 'Engine builds proven on the dyno, and the shops that built them.' },
      ],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }],
    },
  },
  css: ['@fontsource/manrope/400.css', '@fontsource/manrope/500.css', '@fontsource/manrope/600.css', '@fontsource/manrope/700.css', '@fontsource/manrope/800.css', '~/assets/css/main.css'],
  runtimeConfig: {
    databaseUrl: '',
    authSecret: '',
    smtpHost: '127.0.0.1',
    smtpPort: '1025',
    mailFrom: 'Torquewright <no-reply@torquewright.test>',
    uploadsDir: '',
    // NUXT_TRUST_PROXY=1 behind a load balancer: rate limits then key on its X-Forwarded-For entry.
    trustProxy: '',
    // Payments: the SDK talks to the local fake when a host is set, to Stripe itself when not (README, Payments).
    stripeSecretKey: '',
    stripeWebhookSecret: '',
    stripeApiHost: '',
    stripeApiPort: '',
    stripeApiProtocol: '',
    platformFeeBps: 500,
    autoApproveDays: 7,
    dealTaskIntervalMs: 10 * 60_000,
    outboxIntervalMs: 2000,
    public: { appName: 'Torquewright', siteUrl: '' },
  },
  dir: { shared: 'shared' },
  srcDir: '.',
  serverDir: 'server',
  compatibilityDate: '2026-11-01',
  nitro: {
    storage: {},
    experimental: { tasks: false },
    // server/error.ts shapes every error (503 for a database away, real 4xx messages) and answers none itself;
    // Nuxt's handler then renders the error page, and Nitro's own answers JSON after both.
    errorHandler: ['~~/server/error', nuxtErrorHandler],
  },
  typescript: {
    strict: true,
    tsConfig: { exclude: ['../tests/**', '../scripts/**', '../bench/**', '../*.config.ts'] },
    // Tests call services directly, and services import shared code through Nuxt's #shared alias.
    nodeTsConfig: {
      include: ['../tests/**/*', '../scripts/**/*', '../bench/**/*', '../*.config.ts'],
      compilerOptions: { paths: { '#shared': ['../shared'], '#shared/*': ['../shared/*'] } },
    },
  },
  telemetry: false,
  auth: {
    isEnabled: true,
    originEnvKey: 'AUTH_ORIGIN',
    baseURL: '/api/auth',
    provider: { type: 'authjs' },
    globalAppMiddleware: false,
    sessionRefresh: { enablePeriodically: false, enableOnWindowFocus: false },
  },
  eslint: { config: { stylistic: true } },
  tailwindcss: { viewer: false, cssPath: false },
})
