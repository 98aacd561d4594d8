import { randomBytes } from 'node:crypto'
import { rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { resolve } from 'node:path'
import type { TestProject } from 'vitest/node'
import { appEnv, startBuiltServer } from '../../scripts/lib/app'
import { databaseUrl, loadConfig } from '../../scripts/lib/config'
import { startMariadb, recreateDatabase, stopMariadb } from '../../scripts/lib/mariadb'
import { migrateDatabase } from '../../scripts/lib/migrate'
import { stripeEnvForFake, webhookUrl } from '../../scripts/lib/payments'
import { seedDemo } from '../../scripts/lib/seed'
import { createPaymentsFake } from '../../scripts/payments-fake/server'
import { startMailCatcher } from './mail-catcher'

function freePort(): Promise<number> {
  return new Promise((resolvePort, reject) => {
    const srv = createServer()
    srv.once('error', reject)
    srv.listen(0, '127.0.0.1', () => {
      const address = srv.address()
      const port = typeof address === 'object' && address ? address.port : 0
      srv.close(() => resolvePort(port))
    })
  })
}

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string
    mailApiUrl: string
    mailSmtpPort: number
    databaseUrl: string
    paymentsUrl: string
    paymentsKeys: { secretKey: string, webhookSecret: string }
  }
}

/** Starts MariaDB with a fresh test schema and the demo seed, a mail catcher, the payments fake, and the built app on a free port. */
export default async function setup(project: TestProject) {
  const cfg = loadConfig()
  const startedDb = await startMariadb(cfg)
  recreateDatabase(cfg, cfg.db.testName)
  const url = databaseUrl(cfg, cfg.db.testName)
  await migrateDatabase(url)
  const uploadsDir = resolve(cfg.dataDir, 'test-uploads')
  rmSync(uploadsDir, { recursive: true, force: true })
  await seedDemo({ url, uploadsDir })

  const mail = await startMailCatcher()
  const port = await freePort()
  // Keys made for this run only; the fake signs its webhooks for the app on `port`.
  const keys = { secretKey: `sk_test_run_${randomBytes(12).toString('hex')}`, webhookSecret: `whsec_run_${randomBytes(18).toString('hex')}` }
  let paymentsLog = ''
  const payments = await createPaymentsFake({
    port: 0, ...keys, webhookUrl: webhookUrl(port), retryDelaysMs: [200, 400, 800, 1600, 3200],
    log: (line) => {
      paymentsLog += `${line}\n`
    },
  })
  const server = await startBuiltServer(cfg, appEnv(cfg, {
    database: cfg.db.testName, port, smtpPort: mail.smtpPort, uploadsDir,
    // Always the fake in tests, even when real Stripe keys are set in the shell.
    extra: { TW_TEST_MODE: '1', NUXT_TRUST_PROXY: '1', ...stripeEnvForFake(payments.port, keys) },
  }), 'pipe')
  let serverLog = ''
  server.stdout?.on('data', (d) => {
    serverLog += d
  })
  server.stderr?.on('data', (d) => {
    serverLog += d
  })

  project.provide('baseUrl', `http://127.0.0.1:${port}`)
  project.provide('mailApiUrl', mail.apiUrl)
  project.provide('mailSmtpPort', mail.smtpPort)
  project.provide('databaseUrl', url)
  project.provide('paymentsUrl', payments.url)
  project.provide('paymentsKeys', keys)

  return async () => {
    server.kill('SIGTERM')
    await mail.stop()
    await payments.close()
    if (process.env.TW_TEST_SERVER_LOG && serverLog) console.log(serverLog)
    if (process.env.TW_TEST_SERVER_LOG && paymentsLog) console.log(paymentsLog)
    if (startedDb) await stopMariadb(cfg)
  }
}
