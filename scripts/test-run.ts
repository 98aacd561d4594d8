import { existsSync, readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { buildIfStale } from './lib/app'
import { loadConfig } from './lib/config'
import { UserFacingError, run } from './lib/process'

const cfg = loadConfig()
const bin = (name: string) => resolve(cfg.root, 'node_modules', '.bin', name)
const isRoot = typeof process.getuid === 'function' && process.getuid() === 0

/** The browser tier drives Debian's Chromium; install it when missing and allowed to. */
async function ensureChromium(): Promise<void> {
  if (existsSync('/usr/bin/chromium')) return
  if (!isRoot) throw new UserFacingError('Chromium is not installed: run `sudo apt-get install -y chromium`, then run the tests again.')
  console.log('› installing chromium from Debian packages…')
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' }
  await run('apt-get', ['update', '-qq'], { env })
  await run('apt-get', ['install', '-y', '-qq', 'chromium'], { env })
}

async function step(name: string, fn: () => Promise<void>) {
  const t0 = Date.now()
  console.log(`\n━━ ${name}`)
  await fn()
  console.log(`━━ ${name}: done in ${((Date.now() - t0) / 1000).toFixed(1)} s`)
}

async function main() {
  const env = { ...process.env, NUXT_TELEMETRY_DISABLED: '1' }
  await step('lint (eslint)', () => run(bin('eslint'), ['.', '--max-warnings=0'], { cwd: cfg.root, env }))
  await step('typecheck (nuxt typecheck)', () => run(bin('nuxt'), ['typecheck'], { cwd: cfg.root, env }))
  await step('chromium', ensureChromium)
  await step('build (nuxt build)', () => buildIfStale(cfg))
  const report = resolve(cfg.dataDir, 'vitest-report.json')
  let failed: unknown = null
  await step('tests (vitest: unit, integration, browser)', () => run(bin('vitest'), ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${report}`, ...process.argv.slice(2)], { cwd: cfg.root, env })
    .catch((err) => {
      failed = err
    }))
  // One plain closing line, whatever the runner printed above it.
  if (existsSync(report)) {
    const r = JSON.parse(readFileSync(report, 'utf8')) as { numPassedTests: number, numFailedTests: number, numPendingTests: number }
    console.log(`\ntests: ${r.numPassedTests} passed, ${r.numFailedTests} failed, ${r.numPendingTests} skipped`)
  }
  if (failed) throw failed
}

main().catch((err) => {
  console.error(err instanceof UserFacingError ? err.message : err)
  process.exit(1)
})
