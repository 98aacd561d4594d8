import { spawn, spawnSync } from 'node:child_process'
import { closeSync, existsSync, mkdirSync, openSync, writeFileSync } from 'node:fs'
import { userInfo } from 'node:os'
import { resolve } from 'node:path'
import type { ServiceConfig } from './config'
import { UserFacingError, commandExists, livePid, portInUse, run, stopByPidFile, waitFor } from './process'

/** Paths of the private MariaDB instance, all under the project's data folder. */
function paths(cfg: ServiceConfig) {
  const base = resolve(cfg.dataDir, 'mariadb')
  return {
    base,
    datadir: resolve(base, 'data'),
    cnf: resolve(base, 'my.cnf'),
    socket: resolve(base, 'mariadb.sock'),
    pid: resolve(base, 'mariadb.pid'),
    log: resolve(base, 'mariadb.log'),
  }
}

const isRoot = () => typeof process.getuid === 'function' && process.getuid() === 0

/** Installs MariaDB from Debian's packages when it is missing (root only), else says the one command to run. */
export async function ensureMariadbInstalled(): Promise<void> {
  if (commandExists('mariadbd') || existsSync('/usr/sbin/mariadbd')) return
  if (!isRoot()) {
    throw new UserFacingError('MariaDB is not installed: run `sudo apt-get install -y mariadb-server`, then start again.')
  }
  console.log('› installing mariadb-server from Debian packages (about a minute)…')
  await run('apt-get', ['update', '-qq'], { env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } })
  await run('apt-get', ['install', '-y', '-qq', 'mariadb-server'], { env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } })
  // Debian's package starts a system instance on 3306; ours runs beside it on its own port.
}

function writeDefaults(cfg: ServiceConfig): void {
  const p = paths(cfg)
  const lines = [
    '[client-server]',
    `socket=${p.socket}`,
    `port=${cfg.db.port}`,
    '',
    '[mariadbd]',
    `datadir=${p.datadir}`,
    `pid-file=${p.pid}`,
    `log-error=${p.log}`,
    'bind-address=127.0.0.1',
    ...(isRoot() ? ['user=root'] : []),
    'default-time-zone=+00:00',
    'skip-log-bin',
    'skip-name-resolve',
    'character-set-server=utf8mb4',
    'collation-server=utf8mb4_unicode_ci',
    'innodb_buffer_pool_size=128M',
    'innodb_log_file_size=48M',
    'innodb_flush_log_at_trx_commit=2',
    'max_connections=200',
    '',
  ]
  writeFileSync(p.cnf, lines.join('\n'))
}

function client(cfg: ServiceConfig, sql: string) {
  const p = paths(cfg)
  return spawnSync('mariadb', [`--defaults-file=${p.cnf}`, '-u', userInfo().username, '--batch', '-e', sql], { encoding: 'utf8' })
}

function ping(cfg: ServiceConfig): boolean {
  const p = paths(cfg)
  const r = spawnSync('mariadb-admin', [`--defaults-file=${p.cnf}`, '-u', userInfo().username, '--connect-timeout=2', 'ping'], { encoding: 'utf8' })
  return r.status === 0
}

/** Starts the private instance (idempotent) and makes sure the app user and both databases exist. Returns true if this call started it. */
export async function startMariadb(cfg: ServiceConfig): Promise<boolean> {
  await ensureMariadbInstalled()
  const p = paths(cfg)
  mkdirSync(p.base, { recursive: true })
  writeDefaults(cfg)

  let started = false
  if (livePid(p.pid) && ping(cfg)) {
    // Already running from an earlier start.
  }
  else {
    if (await portInUse(cfg.db.port)) {
      throw new UserFacingError(`Port ${cfg.db.port} on 127.0.0.1 is already taken: stop what uses it or set TW_DB_PORT to a free port.`)
    }
    if (!existsSync(resolve(p.datadir, 'mysql'))) {
      mkdirSync(p.datadir, { recursive: true })
      const init = spawnSync('mariadb-install-db', [`--defaults-file=${p.cnf}`, '--auth-root-authentication-method=socket', '--skip-test-db'], { encoding: 'utf8' })
      if (init.status !== 0) throw new UserFacingError(`mariadb-install-db failed: ${(init.stderr || init.stdout).trim().split('\n').pop()}`)
    }
    const out = openSync(p.log, 'a')
    const child = spawn('mariadbd', [`--defaults-file=${p.cnf}`], { detached: true, stdio: ['ignore', out, out] })
    child.unref()
    closeSync(out)
    await waitFor(`MariaDB on 127.0.0.1:${cfg.db.port} (log: ${p.log})`, () => ping(cfg), 60_000)
    started = true
  }

  const { user, password, name, testName } = cfg.db
  const esc = (s: string) => s.replace(/\\/g, '\\\\').replace(/'/g, '\\\'')
  const setup = client(cfg, [
    `CREATE DATABASE IF NOT EXISTS \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
    `CREATE DATABASE IF NOT EXISTS \`${testName}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
    `CREATE USER IF NOT EXISTS '${esc(user)}'@'127.0.0.1' IDENTIFIED BY '${esc(password)}'`,
    `ALTER USER '${esc(user)}'@'127.0.0.1' IDENTIFIED BY '${esc(password)}'`,
    `GRANT ALL PRIVILEGES ON \`${name}\`.* TO '${esc(user)}'@'127.0.0.1'`,
    `GRANT ALL PRIVILEGES ON \`${testName}\`.* TO '${esc(user)}'@'127.0.0.1'`,
  ].join(';\n'))
  if (setup.status !== 0) throw new UserFacingError(`Could not prepare the databases: ${setup.stderr.trim()}`)
  return started
}

/** Drops and recreates one database (used for the tests' fresh schema). */
export function recreateDatabase(cfg: ServiceConfig, database: string): void {
  const r = client(cfg, `DROP DATABASE IF EXISTS \`${database}\`; CREATE DATABASE \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`)
  if (r.status !== 0) throw new UserFacingError(`Could not recreate ${database}: ${r.stderr.trim()}`)
}

export async function stopMariadb(cfg: ServiceConfig): Promise<boolean> {
  return stopByPidFile(paths(cfg).pid, 30_000)
}

/** Makes sure a further database exists and the app user may use it (the bench's own, for instance). */
export function ensureDatabase(cfg: ServiceConfig, database: string): void {
  const esc = (s: string) => s.replace(/\\/g, '\\\\').replace(/'/g, '\\\'')
  const r = client(cfg, [
    `CREATE DATABASE IF NOT EXISTS \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`,
    `GRANT ALL PRIVILEGES ON \`${database}\`.* TO '${esc(cfg.db.user)}'@'127.0.0.1'`,
  ].join(';\n'))
  if (r.status !== 0) throw new UserFacingError(`Could not prepare ${database}: ${r.stderr.trim()}`)
}
