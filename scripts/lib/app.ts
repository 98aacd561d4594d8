import { spawn, type ChildProcess } from 'node:child_process'
import { randomBytes, createHash } from 'node:crypto'
import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { databaseUrl, type ServiceConfig } from './config'
import { stripeEnvForFake, type PaymentsKeys } from './payments'
import { run, waitFor } from './process'

const SOURCE_ENTRIES = ['app.vue', 'error.vue', 'nuxt.config.ts', 'tailwind.config.ts', 'package-lock.json', 'assets', 'components', 'composables', 'layouts', 'middleware', 'pages', 'plugins', 'public', 'search', 'server', 'shared', 'stores', 'utils']

function walk(path: string, out: string[]): void {
  if (!existsSync(path)) return
  const st = statSync(path)
  if (st.isDirectory()) {
    for (const name of readdirSync(path).sort()) walk(join(path, name), out)
  }
  else {
    out.push(`${path}:${st.size}:${Math.round(st.mtimeMs)}`)
  }
}

/** A fingerprint of every file the build reads, so an unchanged tree is not built again. */
export function sourceStamp(root: string): string {
  const entries: string[] = []
  for (const entry of SOURCE_ENTRIES) walk(resolve(root, entry), entries)
  return createHash('sha256').update(entries.join('\n')).digest('hex')
}

/** Runs `nuxt build` unless .output was built from the same sources. */
export async function buildIfStale(cfg: ServiceConfig, force = false): Promise<void> {
  const stampFile = resolve(cfg.root, '.output', '.source-stamp')
  const stamp = sourceStamp(cfg.root)
  if (!force && existsSync(stampFile) && readFileSync(stampFile, 'utf8') === stamp && existsSync(resolve(cfg.root, '.output', 'server', 'index.mjs'))) {
    console.log('› the app build is up to date')
    return
  }
  console.log('› building the app (nuxt build, about a minute)…')
  await run(resolve(cfg.root, 'node_modules', '.bin', 'nuxt'), ['build'], { cwd: cfg.root, env: { ...process.env, NUXT_TELEMETRY_DISABLED: '1' } })
  writeFileSync(stampFile, stamp)
}

/** The auth secret of this data folder, made once so sessions survive a restart. */
export function authSecret(cfg: ServiceConfig): string {
  if (process.env.NUXT_AUTH_SECRET) return process.env.NUXT_AUTH_SECRET
  mkdirSync(cfg.dataDir, { recursive: true })
  const file = resolve(cfg.dataDir, 'auth-secret')
  if (!existsSync(file)) writeFileSync(file, randomBytes(32).toString('hex'), { mode: 0o600 })
  return readFileSync(file, 'utf8').trim()
}

export interface AppEnvOptions {
  database: string
  port: number
  smtpPort: number
  uploadsDir: string
  /** The payments fake the app's Stripe client talks to; ignored when real Stripe keys are set in the environment. */
  payments?: { port: number, keys: PaymentsKeys }
  extra?: Record<string, string>
}

/** The environment the server runs with: every service address it needs. */
export function appEnv(cfg: ServiceConfig, opts: AppEnvOptions): NodeJS.ProcessEnv {
  const origin = `http://127.0.0.1:${opts.port}`
  return {
    ...process.env,
    NODE_ENV: 'production',
    NUXT_TELEMETRY_DISABLED: '1',
    HOST: '127.0.0.1',
    PORT: String(opts.port),
    NITRO_HOST: '127.0.0.1',
    NITRO_PORT: String(opts.port),
    NUXT_DATABASE_URL: databaseUrl(cfg, opts.database),
    NUXT_AUTH_SECRET: authSecret(cfg),
    AUTH_ORIGIN: `${origin}/api/auth`,
    NUXT_PUBLIC_SITE_URL: origin,
    NUXT_SMTP_HOST: '127.0.0.1',
    NUXT_SMTP_PORT: String(opts.smtpPort),
    NUXT_UPLOADS_DIR: opts.uploadsDir,
    // With NUXT_STRIPE_SECRET_KEY set by hand the same code talks to Stripe's test mode instead.
    ...(opts.payments && !process.env.NUXT_STRIPE_SECRET_KEY ? stripeEnvForFake(opts.payments.port, opts.payments.keys) : {}),
    ...opts.extra,
  }
}

/** Starts the built server and waits until /api/health answers. */
export async function startBuiltServer(cfg: ServiceConfig, env: NodeJS.ProcessEnv, stdio: 'inherit' | 'pipe' = 'inherit'): Promise<ChildProcess> {
  const child = spawn(process.execPath, [resolve(cfg.root, '.output', 'server', 'index.mjs')], { cwd: cfg.root, env, stdio: ['ignore', stdio, stdio] })
  let exited = false
  child.once('exit', () => {
    exited = true
  })
  const url = `http://127.0.0.1:${env.PORT}/api/health`
  try {
    await waitFor(`the app on ${url}`, async () => {
      if (exited) throw new Error('the app server exited while starting')
      try {
        return (await fetch(url)).ok
      }
      catch {
        return false
      }
    }, 60_000)
  }
  catch (err) {
    // A server that never became ready is stopped here, since the caller never gets hold of it.
    child.kill('SIGTERM')
    throw err
  }
  return child
}
