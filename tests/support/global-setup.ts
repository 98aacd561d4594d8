import { rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { resolve } from 'node:path'
import type { TestProject } from 'vitest/node'
import { appEnv, startBuiltServer } from '../../scripts/lib/app'
import { databaseUrl, loadConfig } from '../../scripts/lib/config'
import { startMariadb, recreateDatabase, stopMariadb } from '../../scripts/lib/mariadb'
import { migrateDatabase } from '../../scripts/lib/migrate'
import { seedDemo } from '../../scripts/lib/seed'
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
    databaseUrl: string
  }
}

/** Starts MariaDB with a fresh test schema and the demo seed, a mail catcher, and the built app on a free port. */
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
  const server = await startBuiltServer(cfg, appEnv(cfg, {
    database: cfg.db.testName, port, smtpPort: mail.smtpPort, uploadsDir, extra: { TW_TEST_MODE: '1', NUXT_TRUST_PROXY: '1' },
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
  project.provide('databaseUrl', url)

  return async () => {
    server.kill('SIGTERM')
    await mail.stop()
    if (process.env.TW_TEST_SERVER_LOG && serverLog) console.log(serverLog)
    if (startedDb) await stopMariadb(cfg)
  }
}
