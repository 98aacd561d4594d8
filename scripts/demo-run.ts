import { resolve } from 'node:path'
import { appEnv, buildIfStale, startBuiltServer } from './lib/app'
import { databaseUrl, loadConfig } from './lib/config'
import { DEMO_ADMIN, DEMO_PASSWORD, DEMO_RACERS, DEMO_SHOPS } from './lib/demo-data'
import { migrateDatabase } from './lib/migrate'
import { demoPaymentsFake, paymentsKeys } from './lib/payments'
import { UserFacingError, portInUse } from './lib/process'
import { seedDemo } from './lib/seed'
import { developmentServices, startServices, stopServices, type LocalService } from './lib/services'

const cfg = loadConfig()
let started: LocalService[] = []

async function main() {
  if (await portInUse(cfg.app.port)) {
    throw new UserFacingError(`Port ${cfg.app.port} on 127.0.0.1 is already taken: stop what uses it or start with PORT=<free port> npm run demo.`)
  }
  started = await startServices(cfg, developmentServices)
  const url = databaseUrl(cfg, cfg.db.name)
  await migrateDatabase(url)
  const seeded = await seedDemo({ url, uploadsDir: resolve(cfg.dataDir, 'uploads'), paymentsFake: demoPaymentsFake(cfg), savedSearches: true })
  console.log(`› demo scenario: ${seeded.builds} builds (${seeded.created} new)`)
  await buildIfStale(cfg)
  const server = await startBuiltServer(cfg, appEnv(cfg, {
    database: cfg.db.name, port: cfg.app.port, smtpPort: cfg.mail.smtpPort, uploadsDir: resolve(cfg.dataDir, 'uploads'),
    payments: { port: cfg.payments.port, keys: paymentsKeys(cfg) },
  }))

  const accounts = [
    ['admin', DEMO_ADMIN.email],
    ...DEMO_SHOPS.slice(0, 3).map(s => ['builder', s.owner.email]),
    ...DEMO_RACERS.slice(0, 2).map(r => ['racer', r.email]),
  ]
  console.log(`
Torquewright is running on http://127.0.0.1:${cfg.app.port}
  mail inbox   http://127.0.0.1:${cfg.mail.webPort}/index.html
  payments     http://127.0.0.1:${cfg.payments.port} (local fake; test card 4242 4242 4242 4242)
  MariaDB      127.0.0.1:${cfg.db.port} (database ${cfg.db.name})

Demo accounts (password: ${DEMO_PASSWORD}); the README lists them all:
${accounts.map(([role, email]) => `  ${role!.padEnd(8)} ${email}`).join('\n')}

Ctrl-C stops the app and the services this command started.`)

  const shutdown = async () => {
    server.kill('SIGTERM')
    await stopServices(cfg, started)
    process.exit(0)
  }
  process.once('SIGINT', shutdown)
  process.once('SIGTERM', shutdown)
  server.once('exit', async (code) => {
    await stopServices(cfg, started)
    process.exit(code ?? 1)
  })
}

main().catch(async (err) => {
  console.error(err instanceof UserFacingError ? err.message : err)
  await stopServices(cfg, started).catch(() => {})
  process.exit(1)
})
