import { isIP } from 'node:net'
import { parseArgs } from 'node:util'
import { UserFacingError } from '../process'

/** Everything one soak run is told, with its defaults. */
export interface SoakOptions {
  /** Base URLs of the app instances under load; empty means "start our own single instance". */
  bases: string[]
  /** Seconds of the steady phase. */
  duration: number
  users: number
  /** Pause of each virtual user between two actions, uniform in [min, max] ms. */
  think: { min: number, max: number }
  /** Per-request timeout in ms; a request past it counts as an error. */
  timeoutMs: number
  /** Upper bound of requests per phase, whatever the time. */
  maxRequests: number
  fault: {
    enabled: boolean
    /** Seconds of load before the database is stopped. */
    at: number
    /** Seconds the database stays down. */
    down: number
    /** Seconds of load after the database is back. */
    after: number
    /** Shell commands that stop and start the database; null means the project's own stopMariadb/startMariadb. */
    stopCommand: string | null
    startCommand: string | null
  }
  /** The soak's own MariaDB port (own instance) and app port (0: a free one). */
  dbPort: number
  appPort: number
  /** mysql2 URL of the database to reconcile against; null means the soak's own instance. */
  dbUrl: string | null
  seed: number
}

const LIMITS = { users: 1000, duration: 600, fault: 300, requests: 2_000_000 }

function number(raw: string | undefined, name: string, fallback: number, min: number, max: number): number {
  if (raw === undefined) return fallback
  const n = Number(raw)
  if (!Number.isFinite(n) || n < min || n > max) throw new UserFacingError(`--${name} must be a number from ${min} to ${max}, got "${raw}"`)
  return n
}

/** True when a host is a loopback address literal (127.0.0.0/8 or ::1); names are refused, since a name may resolve elsewhere. */
export function isLoopbackHost(host: string): boolean {
  const h = host.replace(/^\[|\]$/g, '').toLowerCase()
  if (isIP(h) === 4) return h.startsWith('127.')
  if (isIP(h) === 6) return h === '::1'
  return false
}

/** Checks that a base URL is plain http(s) on a loopback address and returns it without a trailing slash. */
export function loopbackBase(raw: string): string {
  let url: URL
  try {
    url = new URL(raw)
  }
  catch {
    throw new UserFacingError(`--base "${raw}" is not a URL`)
  }
  if (url.protocol !== 'http:' && url.protocol !== 'https:') throw new UserFacingError(`--base "${raw}" must be http or https`)
  if (!isLoopbackHost(url.hostname)) throw new UserFacingError(`--base "${raw}" is not a loopback address: the soak only runs against 127.0.0.0/8 or ::1`)
  return url.origin
}

export const USAGE = `npm run soak -- [options]
  --base URL           an app instance to load (repeat or comma-separate for several; loopback only).
                       Default: start our own built server on its own data folder (.data/soak).
  --duration S         seconds of the steady phase (default 60)
  --users N            concurrent virtual users (default 200)
  --think MIN-MAX      pause between one user's actions in ms (default 1000-3000; 0 for none)
  --timeout MS         per-request timeout (default 10000)
  --max-requests N     bound on requests per phase (default 400000)
  --no-fault           skip the database fault phase
  --fault-at S         seconds of load before the database stops (default 10)
  --fault-down S       seconds the database stays down (default 15)
  --fault-after S      seconds of load after it is back (default 20)
  --db-stop CMD        shell command that stops the database (default: the project's stopMariadb)
  --db-start CMD       shell command that starts it again (default: the project's startMariadb)
  --db-url URL         mysql://… of the database to reconcile (default: the soak's own instance)
  --db-port N          port of the soak's own MariaDB (default TW_SOAK_DB_PORT or 3437)
  --app-port N         port of the soak's own app server (default TW_SOAK_APP_PORT or a free port)
  --seed N             seed of the virtual users' choices (default 1)`

export function parseSoakOptions(argv: string[]): SoakOptions {
  const { values } = parseArgs({
    args: argv,
    allowPositionals: false,
    options: {
      'base': { type: 'string', multiple: true },
      'duration': { type: 'string' },
      'users': { type: 'string' },
      'think': { type: 'string' },
      'timeout': { type: 'string' },
      'max-requests': { type: 'string' },
      'no-fault': { type: 'boolean' },
      'fault-at': { type: 'string' },
      'fault-down': { type: 'string' },
      'fault-after': { type: 'string' },
      'db-stop': { type: 'string' },
      'db-start': { type: 'string' },
      'db-url': { type: 'string' },
      'db-port': { type: 'string' },
      'app-port': { type: 'string' },
      'seed': { type: 'string' },
      'help': { type: 'boolean' },
    },
  })
  if (values.help) {
    console.log(USAGE)
    process.exit(0)
  }
  const bases = (values.base ?? []).flatMap(b => b.split(',')).map(b => b.trim()).filter(Boolean).map(loopbackBase)
  const think = (values.think ?? '1000-3000').split('-').map(s => number(s, 'think', 0, 0, 60_000))
  if ((think[1] ?? think[0] ?? 0) < (think[0] ?? 0)) throw new UserFacingError('--think is MIN-MAX with MIN at most MAX')
  const stopCommand = values['db-stop'] ?? null
  const startCommand = values['db-start'] ?? null
  if ((stopCommand === null) !== (startCommand === null)) throw new UserFacingError('--db-stop and --db-start go together')
  if (bases.length > 0 && !values['no-fault'] && stopCommand === null) {
    throw new UserFacingError('With --base, say how to stop and start the database (--db-stop and --db-start), or pass --no-fault')
  }
  if (bases.length > 0 && !values['db-url']) throw new UserFacingError('With --base, give the database to reconcile against (--db-url mysql://…@127.0.0.1:…/…)')
  if (values['db-url']) {
    let host = ''
    try {
      host = new URL(values['db-url']).hostname
    }
    catch {
      throw new UserFacingError('--db-url is not a URL')
    }
    if (!isLoopbackHost(host)) throw new UserFacingError('--db-url must point at a loopback address')
  }
  return {
    bases,
    duration: number(values.duration, 'duration', 60, 1, LIMITS.duration),
    users: Math.round(number(values.users, 'users', 200, 1, LIMITS.users)),
    think: { min: think[0] ?? 0, max: think[1] ?? think[0] ?? 0 },
    timeoutMs: number(values.timeout, 'timeout', 10_000, 100, 120_000),
    maxRequests: Math.round(number(values['max-requests'], 'max-requests', 400_000, 1, LIMITS.requests)),
    fault: {
      enabled: !values['no-fault'],
      at: number(values['fault-at'], 'fault-at', 10, 0, LIMITS.fault),
      down: number(values['fault-down'], 'fault-down', 15, 1, LIMITS.fault),
      after: number(values['fault-after'], 'fault-after', 20, 1, LIMITS.fault),
      stopCommand,
      startCommand,
    },
    dbPort: Math.round(number(values['db-port'] ?? process.env.TW_SOAK_DB_PORT, 'db-port', 3437, 1, 65535)),
    appPort: Math.round(number(values['app-port'] ?? process.env.TW_SOAK_APP_PORT, 'app-port', 0, 0, 65535)),
    dbUrl: values['db-url'] ?? null,
    seed: Math.round(number(values.seed, 'seed', 1, 0, 2 ** 31)),
  }
}
