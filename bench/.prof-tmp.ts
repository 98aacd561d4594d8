import { spawn } from 'node:child_process'
import { resolve } from 'node:path'
import autocannon from 'autocannon'
import { startPageStack } from '/work/wt/fast/bench/pages'
import { appEnv } from '/work/wt/fast/scripts/lib/app'
import { loadConfig } from '/work/wt/fast/scripts/lib/config'
import { waitFor } from '/work/wt/fast/scripts/lib/process'
const stack = await startPageStack({ bare: false })
const cfg = loadConfig()
const env = appEnv(cfg, { database: 'torquewright_bench_pages', port: 3662, smtpPort: cfg.mail.smtpPort, uploadsDir: resolve(cfg.dataDir, 'bench-pages-uploads') })
const child = spawn(process.execPath, ['--cpu-prof', '--cpu-prof-dir=/tmp/fast-prof', resolve(cfg.root, '.output/server/index.mjs')], { env, stdio: 'ignore' })
await waitFor('prof server', async () => { try { return (await fetch('http://127.0.0.1:3662/api/health')).ok } catch { return false } }, 60000)
for (const path of process.argv.slice(2)) {
  const r = await autocannon({ url: 'http://127.0.0.1:3662' + path, connections: 10, duration: 6 })
  console.log(path, r.requests.average, r.latency.p99)
}
const exited = new Promise(r => child.once('exit', r))
child.kill('SIGINT')
await exited
await stack.close()
