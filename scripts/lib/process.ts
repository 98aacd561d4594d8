import { spawn, spawnSync, type SpawnOptions } from 'node:child_process'
import { existsSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { createConnection } from 'node:net'

/** A failure the user can act on: printed as one line, without a stack trace. */
export class UserFacingError extends Error {}

export function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0)
    return true
  }
  catch {
    return false
  }
}

/** The pid recorded in a pid file, or null; a stale file (process gone) is removed. */
export function livePid(pidFile: string): number | null {
  if (!existsSync(pidFile)) return null
  const pid = Number(readFileSync(pidFile, 'utf8').trim())
  if (Number.isInteger(pid) && pid > 0 && isAlive(pid)) return pid
  rmSync(pidFile, { force: true })
  return null
}

export function writePid(pidFile: string, pid: number): void {
  writeFileSync(pidFile, `${pid}\n`)
}

/** True when something already accepts TCP connections on 127.0.0.1:port. */
export function portInUse(port: number): Promise<boolean> {
  return new Promise((resolvePromise) => {
    const socket = createConnection({ host: '127.0.0.1', port })
    socket.once('connect', () => {
      socket.destroy()
      resolvePromise(true)
    })
    socket.once('error', () => resolvePromise(false))
    socket.setTimeout(1000, () => {
      socket.destroy()
      resolvePromise(false)
    })
  })
}

export async function waitFor(what: string, check: () => Promise<boolean> | boolean, timeoutMs = 30_000): Promise<void> {
  const until = Date.now() + timeoutMs
  while (Date.now() < until) {
    if (await check()) return
    await new Promise(r => setTimeout(r, 150))
  }
  throw new UserFacingError(`${what} did not become ready within ${Math.round(timeoutMs / 1000)} s`)
}

export function commandExists(cmd: string): boolean {
  return spawnSync('sh', ['-c', `command -v ${cmd}`], { stdio: 'ignore' }).status === 0
}

export function run(cmd: string, args: string[], options: SpawnOptions = {}): Promise<void> {
  return new Promise((resolvePromise, reject) => {
    const child = spawn(cmd, args, { stdio: 'inherit', ...options })
    child.once('error', reject)
    child.once('exit', code => code === 0 ? resolvePromise() : reject(new UserFacingError(`${cmd} ${args.join(' ')} exited with ${code}`)))
  })
}

/** Stops a process by its pid file: TERM, then KILL after a grace period. */
export async function stopByPidFile(pidFile: string, graceMs = 15_000): Promise<boolean> {
  const pid = livePid(pidFile)
  if (!pid) return false
  process.kill(pid, 'SIGTERM')
  const until = Date.now() + graceMs
  while (Date.now() < until && isAlive(pid)) await new Promise(r => setTimeout(r, 100))
  if (isAlive(pid)) process.kill(pid, 'SIGKILL')
  rmSync(pidFile, { force: true })
  return true
}
