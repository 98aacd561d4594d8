import { spawn } from 'node:child_process'
import { resolve } from 'node:path'
import { appEnv } from './lib/app'
import { databaseUrl, loadConfig } from './lib/config'
import { migrateDatabase } from './lib/migrate'
import { demoPaymentsFake, paymentsKeys } from './lib/payments'
import { UserFacingError } from './lib/process'
import { seedDemo } from './lib/seed'
import { developmentServices, startServices, stopServices, type LocalService } from './lib/services'

const cfg = loadConfig()
let started: LocalService[] = []

async function main() {
  started = await startServices(cfg, developmentServices)
  const url = databaseUrl(cfg, cfg.db.name)
  await migrateDatabase(url)
  await seedDemo({ url, uploadsDir: resolve(cfg.dataDir, 'uploads'), paymentsFake: demoPaymentsFake(cfg), savedSearches: true })
  const env = appEnv(cfg, { database: cfg.db.name, port: cfg.app.port, smtpPort: cfg.mail.smtpPort, uploadsDir: resolve(cfg.dataDir, 'uploads'), payments: { port: cfg.payments.port, keys: paymentsKeys(cfg) } })
  const nuxt = spawn(resolve(cfg.root, 'node_modules', '.bin', 'nuxt'), ['dev', '--host', '127.0.0.1', '--port', String(cfg.app.port)], {
    cwd: cfg.root, stdio: 'inherit', env: { ...env, NODE_ENV: 'development' },
  })
  const shutdown = async () => {
    nuxt.kill('SIGTERM')
    await stopServices(cfg, started)
    process.exit(0)
  }
  process.once('SIGINT', shutdown)
  process.once('SIGTERM', shutdown)
}

main().catch(async (err) => {
  console.error(err instanceof UserFacingError ? err.message : err)
  await stopServices(cfg, started).catch(() => {})
  process.exit(1)
})
