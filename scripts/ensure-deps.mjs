// Installs the npm dependencies when node_modules is missing or older than package-lock.json.
// Plain Node with no dependencies, so it runs on a fresh clone before anything is installed.
import { spawnSync } from 'node:child_process'
import { existsSync, statSync } from 'node:fs'
import { resolve } from 'node:path'

const root = resolve(import.meta.dirname, '..')

/** npm writes node_modules/.package-lock.json after every install: older than package-lock.json means out of date. */
function upToDate() {
  const hidden = resolve(root, 'node_modules', '.package-lock.json')
  if (!existsSync(hidden) || !existsSync(resolve(root, 'node_modules', '.bin', 'nuxt'))) return false
  return statSync(hidden).mtimeMs >= statSync(resolve(root, 'package-lock.json')).mtimeMs
}

export function ensureDeps() {
  if (upToDate()) return
  console.log('› installing npm dependencies (npm ci)…')
  const r = spawnSync('npm', ['ci', '--no-audit', '--no-fund'], { cwd: root, stdio: 'inherit', env: { ...process.env, NUXT_TELEMETRY_DISABLED: '1' } })
  if (r.status !== 0) {
    console.error('npm ci failed: see the output above (is the npm registry reachable?)')
    process.exit(1)
  }
}

/** Runs a TypeScript entry point under tsx once the dependencies are in place. */
export async function runTs(entry) {
  ensureDeps()
  const { register } = await import('tsx/esm/api')
  register()
  await import(resolve(root, entry))
}
