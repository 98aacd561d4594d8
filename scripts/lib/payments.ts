import { spawn } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, writeFileSync } from 'node:fs'
import { resolve } from 'node:path'
import type { ServiceConfig } from './config'
import { UserFacingError, livePid, portInUse, stopByPidFile, waitFor, writePid } from './process'

const pidFile = (cfg: ServiceConfig) => resolve(cfg.runDir, 'payments-fake.pid')

export interface PaymentsKeys {
  secretKey: string
  webhookSecret: string
}

/** The fake's API key and webhook signing secret for this data folder, made once; the app is given the same pair. */
export function paymentsKeys(cfg: ServiceConfig): PaymentsKeys {
  mkdirSync(cfg.dataDir, { recursive: true })
  const file = resolve(cfg.dataDir, 'payments-keys.json')
  if (!existsSync(file)) {
    const keys: PaymentsKeys = { secretKey: `sk_test_local_${randomBytes(16).toString('hex')}`, webhookSecret: `whsec_local_${randomBytes(24).toString('hex')}` }
    writeFileSync(file, JSON.stringify(keys, null, 2), { mode: 0o600 })
  }
  return JSON.parse(readFileSync(file, 'utf8')) as PaymentsKeys
}

/**
 * The running local fake the demo seeds its open dispute through; none when Stripe keys were set by
 * hand (the app then talks to Stripe, which could not settle a payment made at the fake).
 */
export function demoPaymentsFake(cfg: ServiceConfig): { port: number, secretKey: string } | undefined {
  if (process.env.NUXT_STRIPE_SECRET_KEY) return undefined
  return { port: cfg.payments.port, secretKey: paymentsKeys(cfg).secretKey }
}

/** The app's webhook route, where the fake sends its signed events. */
export const webhookUrl = (appPort: number) => `http://127.0.0.1:${appPort}/api/webhooks/stripe`

/** The environment that points the app's Stripe client at the fake (see the README's Payments section). */
export function stripeEnvForFake(port: number, keys: PaymentsKeys): Record<string, string> {
  return {
    NUXT_STRIPE_SECRET_KEY: keys.secretKey,
    NUXT_STRIPE_WEBHOOK_SECRET: keys.webhookSecret,
    NUXT_STRIPE_API_HOST: '127.0.0.1',
    NUXT_STRIPE_API_PORT: String(port),
    NUXT_STRIPE_API_PROTOCOL: 'http',
  }
}

/** Starts the payments fake as a detached process, idempotent. Returns true if this call started it. */
export async function startPaymentsFake(cfg: ServiceConfig): Promise<boolean> {
  mkdirSync(cfg.runDir, { recursive: true })
  if (livePid(pidFile(cfg))) return false
  if (await portInUse(cfg.payments.port)) {
    throw new UserFacingError(`Port ${cfg.payments.port} on 127.0.0.1 is already taken: stop what uses it or set TW_PAYMENTS_PORT.`)
  }
  const keys = paymentsKeys(cfg)
  const log = openSync(resolve(cfg.runDir, 'payments-fake.log'), 'a')
  const child = spawn(process.execPath, ['--import', 'tsx', resolve(cfg.root, 'scripts', 'payments-fake', 'main.ts')], {
    cwd: cfg.root,
    detached: true,
    stdio: ['ignore', log, log],
    env: {
      ...process.env,
      TW_PAYMENTS_PORT: String(cfg.payments.port),
      TW_PAYMENTS_SECRET_KEY: keys.secretKey,
      TW_PAYMENTS_WEBHOOK_SECRET: keys.webhookSecret,
      TW_PAYMENTS_WEBHOOK_URL: webhookUrl(cfg.app.port),
      // The demo keeps its payments across restarts, so a deposit paid yesterday can be paid out today.
      TW_PAYMENTS_STATE_FILE: resolve(cfg.dataDir, 'payments-fake-state.json'),
    },
  })
  child.unref()
  closeSync(log)
  if (!child.pid) throw new UserFacingError('The payments fake could not be started')
  writePid(pidFile(cfg), child.pid)
  await waitFor(`the payments fake on 127.0.0.1:${cfg.payments.port}`, () => portInUse(cfg.payments.port), 20_000)
  return true
}

export function stopPaymentsFake(cfg: ServiceConfig): Promise<boolean> {
  return stopByPidFile(pidFile(cfg))
}
