import { spawn, type ChildProcess } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { createWriteStream, existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs'
import { createServer } from 'node:net'
import { resolve } from 'node:path'
import { createPaymentsFake } from '../../payments-fake/server'
import { appEnv, buildIfStale, startBuiltServer } from '../app'
import { databaseUrl, loadConfig, type ServiceConfig } from '../config'
import { ensureDatabase, recreateDatabase, startMariadb, stopMariadb } from '../mariadb'
import { migrateDatabase } from '../migrate'
import { stripeEnvForFake, webhookUrl } from '../payments'
import { portInUse, UserFacingError } from '../process'
import { seedDemo } from '../seed'
import { startMailSink } from './mail-sink'
import type { SoakOptions } from './options'

/** How the run stops and starts the database under the app: the project's own scripts, or shell commands. */
export interface DatabaseControl {
  describe: string
  stop: () => Promise<void>
  start: () => Promise<void>
}

/** What the run stands on: the instances to load, the database to reconcile, and how to take it all down. */
export interface SoakStack {
  bases: string[]
  dbUrl: string
  database: DatabaseControl | null
  /** Lines of the app's log so far that match each of LOG_PATTERNS (own instance only; zeros otherwise). */
  logCounts: () => Record<LogPattern, number>
  /** CPU seconds used so far by the app server and by MariaDB (own instance only, Linux; null when unknown). */
  cpuSeconds: () => { app: number | null, mariadb: number | null, mariadbPid: number | null }
  /** Messages the app's outbox handed to SMTP (own instance only). */
  mailSent: () => number | null
  logFile: string | null
  close: () => Promise<void>
}

/** What the run counts in the app's log: failed requests, and the database errors behind them (one `code:` line per error). */
export const LOG_PATTERNS = {
  'request errors': /\[request error\]/,
  'deadlocks': /code: 'ER_LOCK_DEADLOCK'/,
  'lock wait timeouts': /code: 'ER_LOCK_WAIT_TIMEOUT'/,
  'lost or refused connections': /code: '(PROTOCOL_CONNECTION_LOST|ECONNREFUSED|ECONNRESET)'/,
}
export type LogPattern = keyof typeof LOG_PATTERNS
const NO_LOG = Object.fromEntries(Object.keys(LOG_PATTERNS).map(k => [k, 0])) as Record<LogPattern, number>

/** User plus system CPU seconds of a live process, from /proc (Linux counts them in USER_HZ ticks, 100 a second). */
export function processCpuSeconds(pid: number | undefined): number | null {
  if (!pid) return null
  try {
    // The command name (field 2) may hold spaces; the fields after its closing parenthesis are plain.
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8')
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ')
    return (Number(fields[11]) + Number(fields[12])) / 100
  }
  catch {
    return null
  }
}

function pidFromFile(file: string): number | undefined {
  if (!existsSync(file)) return undefined
  const pid = Number(readFileSync(file, 'utf8').trim())
  return Number.isInteger(pid) && pid > 0 ? pid : undefined
}

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

function shell(command: string): Promise<void> {
  return new Promise((resolveRun, reject) => {
    const child = spawn('sh', ['-c', command], { stdio: 'inherit' })
    child.once('error', reject)
    child.once('exit', code => (code === 0 ? resolveRun() : reject(new Error(`"${command}" exited with ${code}`))))
  })
}

/** The database the soak recreates on every run, in its own instance. */
export const SOAK_DATABASE = 'torquewright_soak'

/**
 * The soak's own service settings: its data folder (.data/soak, or TW_SOAK_DATA_DIR) and its own
 * MariaDB port. TW_DATA_DIR is not read, so a shell set up for the demo never points the soak at the demo's data.
 */
export function soakConfig(opts: SoakOptions): ServiceConfig {
  process.env.TW_DATA_DIR = process.env.TW_SOAK_DATA_DIR || '.data/soak'
  // loadConfig reads the port from the environment; the demo's TW_DB_PORT must not leak into the soak's instance.
  process.env.TW_DB_PORT = String(opts.dbPort)
  return loadConfig()
}

function commandControl(opts: SoakOptions): DatabaseControl | null {
  if (!opts.fault.enabled || !opts.fault.stopCommand || !opts.fault.startCommand) return null
  const { stopCommand, startCommand } = opts.fault
  return { describe: `\`${stopCommand}\` / \`${startCommand}\``, stop: () => shell(stopCommand), start: () => shell(startCommand) }
}

/** Instances given with --base: nothing is started, the database is reached through --db-url. */
export function externalStack(opts: SoakOptions): SoakStack {
  return { bases: opts.bases, dbUrl: opts.dbUrl!, database: commandControl(opts), logCounts: () => ({ ...NO_LOG }), cpuSeconds: () => ({ app: null, mariadb: null, mariadbPid: null }), mailSent: () => null, logFile: null, close: async () => {} }
}

/**
 * The soak's own single instance: MariaDB on its own port and data folder with a fresh database
 * (migrated, demo seeded), an SMTP sink and the payments fake in process, and the built server
 * with NUXT_TRUST_PROXY=1 so each virtual user's X-Forwarded-For address is its own for the rate limits.
 */
export async function ownStack(opts: SoakOptions, log: (line: string) => void): Promise<SoakStack> {
  const cfg = soakConfig(opts)
  log(`› data folder ${cfg.dataDir}, MariaDB on 127.0.0.1:${cfg.db.port}`)
  await buildIfStale(cfg)
  const appPort = opts.appPort || await freePort()
  if (await portInUse(appPort)) throw new UserFacingError(`Port ${appPort} on 127.0.0.1 is already taken: pick another with --app-port.`)

  const closers: (() => Promise<void>)[] = []
  const close = async () => {
    for (const c of closers.reverse()) await c().catch(err => console.error(`› while stopping: ${(err as Error).message}`))
  }
  try {
    const startedDb = await startMariadb(cfg)
    // Stopped at the end when this run started it, or restarted it in the fault phase (then it is this run's process).
    let restarted = false
    closers.push(async () => {
      if (startedDb || restarted) await stopMariadb(cfg)
    })
    const database = SOAK_DATABASE
    recreateDatabase(cfg, database)
    ensureDatabase(cfg, database)
    const dbUrl = databaseUrl(cfg, database)
    await migrateDatabase(dbUrl)
    const uploadsDir = resolve(cfg.dataDir, 'uploads')
    rmSync(uploadsDir, { recursive: true, force: true })
    const t = performance.now()
    await seedDemo({ url: dbUrl, uploadsDir })
    log(`› fresh database ${database}, demo seeded in ${((performance.now() - t) / 1000).toFixed(1)} s`)

    const mail = await startMailSink()
    closers.push(mail.stop)
    const keys = { secretKey: `sk_test_soak_${randomBytes(12).toString('hex')}`, webhookSecret: `whsec_soak_${randomBytes(18).toString('hex')}` }
    const payments = await createPaymentsFake({ port: 0, ...keys, webhookUrl: webhookUrl(appPort) })
    closers.push(() => payments.close())

    mkdirSync(cfg.runDir, { recursive: true })
    const logFile = resolve(cfg.runDir, 'soak-app.log')
    const out = createWriteStream(logFile)
    const counts = { ...NO_LOG }
    let pending = ''
    const server: ChildProcess = await startBuiltServer(cfg, appEnv(cfg, {
      database, port: appPort, smtpPort: mail.smtpPort, uploadsDir,
      extra: { NUXT_TRUST_PROXY: '1', ...stripeEnvForFake(payments.port, keys) },
    }), 'pipe')
    const keep = (d: Buffer) => {
      out.write(d)
      const lines = (pending + d.toString('utf8')).split('\n')
      pending = lines.pop() ?? ''
      for (const line of lines) {
        for (const name of Object.keys(LOG_PATTERNS) as LogPattern[]) if (LOG_PATTERNS[name].test(line)) counts[name]++
      }
    }
    server.stdout?.on('data', keep)
    server.stderr?.on('data', keep)
    closers.push(async () => {
      if (server.exitCode === null && server.signalCode === null) {
        const exited = new Promise(r => server.once('exit', r))
        server.kill('SIGTERM')
        await exited
      }
      out.end()
    })
    log(`› app on http://127.0.0.1:${appPort} (log: ${logFile})`)

    const control: DatabaseControl | null = !opts.fault.enabled
      ? null
      : commandControl(opts) ?? {
        describe: 'stopMariadb / startMariadb (scripts/lib/mariadb.ts)',
        stop: async () => void await stopMariadb(cfg),
        start: async () => {
          restarted = true
          await startMariadb(cfg)
        },
      }
    return {
      bases: [`http://127.0.0.1:${appPort}`],
      dbUrl,
      database: control,
      logCounts: () => ({ ...counts }),
      cpuSeconds: () => {
        const mariadbPid = pidFromFile(resolve(cfg.dataDir, 'mariadb', 'mariadb.pid')) ?? null
        return { app: processCpuSeconds(server.pid), mariadb: processCpuSeconds(mariadbPid ?? undefined), mariadbPid }
      },
      mailSent: mail.received,
      logFile,
      close,
    }
  }
  catch (err) {
    await close()
    throw err
  }
}
