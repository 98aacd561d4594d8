// Nuxt configuration: the root is the source folder (no app/ folder), see DEVELOPERS.md.
import { createRequire } from 'node:module'
import { dirname, join } from 'node:path'

// Nuxt's own error handler (it renders error.vue), which Nuxt adds only when no handler is configured.
const nuxtErrorHandler = join(dirname(createRequire(createRequire(import.meta.url).resolve('nuxt/package.json')).resolve('@nuxt/nitro-server')), 'runtime/handlers/error')

export default defineNuxtConfig({
  modules: ['@pinia/nuxt', '@nuxtjs/tailwindcss', '@sidebase/nuxt-auth', '@nuxt/eslint', 'nuxt-security'],
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
  // Manrope's latin subset in the weights the pages use (400 body, 600, 700, 800; 500 falls back to 400), font-display: swap.
  css: ['@fontsource/manrope/latin-400.css', '@fontsource/manrope/latin-600.css', '@fontsource/manrope/latin-700.css', '@fontsource/manrope/latin-800.css', '~/assets/css/font-fallback.css', '~/assets/css/main.css'],
  runtimeConfig: {
    databaseUrl: '',
    authSecret: '',
    smtpHost: '127.0.0.1',
    smtpPort: '1025',
    mailFrom: 'Torquewright <no-reply@torquewright.test>',
    uploadsDir: '',
    // Where uploads live: 'fs' (the folder above, one machine or a shared mount) or 'mariadb' (rows, replicated by Galera).
    uploadsDriver: 'fs',
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
  // API answers are data, never documents: nothing may load, run or frame them (nuxt-security sends the page CSP).
  routeRules: {
    '/api/**': { headers: { 'content-security-policy': 'default-src \'none\'; frame-ancestors \'none\'' } },
  },
  // Smaller client entry: no app manifest (route rules are server-side only: the API headers above; nothing is
  // prerendered). The JSON payload stays: its reducers bring a fetch error back as a NuxtError with its status.
  experimental: { appManifest: false },
  compatibilityDate: '2026-11-01',
  nitro: {
    storage: {},
    // Every public asset also as .gz and .br, served as the client's Accept-Encoding allows (pages and JSON: server/plugins/compression.ts).
    compressPublicAssets: { gzip: true, brotli: true },
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
  hooks: {
    // No prefetch hints for the chunks a page loads later (lazily hydrated parts, other routes): on a
    // phone's link they compete with the first screen's script, style and font for the same bandwidth.
    // Those chunks load when their part hydrates, and NuxtLink still prefetches a route it shows.
    'build:manifest'(manifest) {
      for (const entry of Object.values(manifest)) entry.prefetch = false
    },
  },
  auth: {
    isEnabled: true,
    originEnvKey: 'AUTH_ORIGIN',
    baseURL: '/api/auth',
    provider: { type: 'authjs' },
    globalAppMiddleware: false,
    sessionRefresh: { enablePeriodically: false, enableOnWindowFocus: false },
  },
  eslint: { config: { stylistic: true } },
  // Security headers on every answer, with a nonce CSP on the server-rendered pages (README, Security).
  // Our own middleware (server/middleware/) checks the origin of writes and bounds and types the
  // bodies, so nuxt-security's request guards are off; so are its in-memory rate limiter (sign-in has
  // its own limits), its XSS filter (inputs are validated with zod, output escaped by Vue) and
  // Cross-Origin-Embedder-Policy (nothing here needs cross-origin isolation).
  security: {
    nonce: true,
    sri: true,
    hidePoweredBy: true,
    removeLoggers: false,
    requestSizeLimiter: false,
    rateLimiter: false,
    xssValidator: false,
    corsHandler: false,
    allowedMethodsRestricter: false,
    headers: {
      contentSecurityPolicy: {
        'default-src': ['\'self\''],
        'base-uri': ['\'none\''],
        'connect-src': ['\'self\''],
        // Vite inlines the smallest @fontsource subsets as data: URLs.
        'font-src': ['\'self\'', 'data:'],
        'form-action': ['\'self\''],
        'frame-ancestors': ['\'none\''],
        'img-src': ['\'self\'', 'data:'],
        'object-src': ['\'none\''],
        // The nonce covers Nuxt's own inline state script and entry; 'strict-dynamic' lets them load their chunks.
        'script-src': ['\'self\'', '\'strict-dynamic\'', '\'nonce-{{nonce}}\''],
        'script-src-attr': ['\'none\''],
        // Vue's style bindings and the chart canvas need inline styles; no inline script is allowed.
        'style-src': ['\'self\'', '\'unsafe-inline\''],
        'upgrade-insecure-requests': false,
      },
      crossOriginEmbedderPolicy: false,
      crossOriginOpenerPolicy: 'same-origin',
      crossOriginResourcePolicy: 'same-origin',
      // 'same-origin' keeps the Origin header on our own writes (with 'no-referrer' browsers send Origin: null).
      referrerPolicy: 'same-origin',
      xFrameOptions: 'DENY',
      xContentTypeOptions: 'nosniff',
      permissionsPolicy: { 'camera': [], 'display-capture': [], 'fullscreen': [], 'geolocation': [], 'microphone': [], 'payment': [] },
    },
  },
  tailwindcss: { viewer: false, cssPath: false },
})
