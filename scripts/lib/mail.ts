import { spawn } from 'node:child_process'
import { closeSync, mkdirSync, openSync } from 'node:fs'
import { resolve } from 'node:path'
import type { ServiceConfig } from './config'
import { UserFacingError, livePid, portInUse, stopByPidFile, waitFor, writePid } from './process'

const pidFile = (cfg: ServiceConfig) => resolve(cfg.runDir, 'mail-catcher.pid')

/** Starts the development mail catcher (SMTP plus a web inbox), idempotent. Returns true if this call started it. */
export async function startMailCatcher(cfg: ServiceConfig): Promise<boolean> {
  mkdirSync(cfg.runDir, { recursive: true })
  if (livePid(pidFile(cfg))) return false
  for (const port of [cfg.mail.smtpPort, cfg.mail.webPort]) {
    if (await portInUse(port)) {
      throw new UserFacingError(`Port ${port} on 127.0.0.1 is already taken: stop what uses it or set TW_SMTP_PORT / TW_MAIL_WEB_PORT.`)
    }
  }
  const log = openSync(resolve(cfg.runDir, 'mail-catcher.log'), 'a')
  const bin = resolve(cfg.root, 'node_modules', 'maildev', 'dist', 'bin', 'maildev.js')
  const child = spawn(process.execPath, [bin, '--ip', '127.0.0.1', '--web-ip', '127.0.0.1', '-s', String(cfg.mail.smtpPort), '-w', String(cfg.mail.webPort), '--silent'], {
    detached: true, stdio: ['ignore', log, log],
  })
  child.unref()
  closeSync(log)
  if (!child.pid) throw new UserFacingError('The mail catcher could not be started')
  writePid(pidFile(cfg), child.pid)
  await waitFor(`the mail catcher on 127.0.0.1:${cfg.mail.smtpPort}`, () => portInUse(cfg.mail.smtpPort), 20_000)
  return true
}

export function stopMailCatcher(cfg: ServiceConfig): Promise<boolean> {
  return stopByPidFile(pidFile(cfg))
}
