// `npm run soak`: a bounded, loopback-only load run with a database fault and a reconciliation
// of every acknowledged write against MariaDB. `npm run soak -- --help` lists the options;
// the README's "Reliability (soak)" section says what it does and keeps its figures.
import { randomBytes } from 'node:crypto'
import { cpus, loadavg } from 'node:os'
import { Client } from './lib/soak/http'
import { DATABASE_KINDS, preparePopulation, runUser, type PhaseRun, type Population } from './lib/soak/load'
import { parseSoakOptions, type SoakOptions } from './lib/soak/options'
import { reconcile, reconciled, reconciliationLines, type Reconciliation } from './lib/soak/reconcile'
import { externalStack, ownStack, type SoakStack } from './lib/soak/stack'
import { fmtCounts, ok, outcomes, phaseTable, type Sample } from './lib/soak/stats'
import { UserFacingError } from './lib/process'

const log = (line: string) => console.log(line)
const sleep = (ms: number) => new Promise<void>(r => setTimeout(r, ms))
const load = () => loadavg().map(n => n.toFixed(2)).join(' ')

interface PhaseResult {
  cpu: string
  samples: Sample[]
  examples: Map<string, string>
  seconds: number
  loadBefore: string
  loadAfter: string
}

/** Runs every virtual user until `control` returns (or the request budget is spent), then waits for the last answers. */
async function runPhase(name: string, opts: SoakOptions, client: Client, pop: Population, stack: SoakStack, control: (phase: PhaseRun) => Promise<void>): Promise<PhaseResult> {
  const loadBefore = load()
  const cpuBefore = { ...stack.cpuSeconds(), generator: process.cpuUsage() }
  const phase: PhaseRun = { name, startedAt: performance.now(), samples: [], stop: false, budget: opts.maxRequests, examples: new Map() }
  const users = Promise.all(pop.users.map(u => runUser(client, u, pop, phase, opts.think)))
  await Promise.race([control(phase), users])
  phase.stop = true
  await users
  const seconds = (performance.now() - phase.startedAt) / 1000
  const cpuAfter = stack.cpuSeconds()
  const generator = process.cpuUsage(cpuBefore.generator)
  const share = (used: number | null) => (used === null ? 'unknown' : `${used.toFixed(1)} s (${Math.round(100 * used / seconds)} % of one core)`)
  const diff = (a: number | null, b: number | null) => (a === null || b === null || b < a ? null : b - a)
  const cpu = `  CPU used in the phase: app ${share(diff(cpuBefore.app, cpuAfter.app))}, MariaDB ${cpuBefore.mariadbPid === cpuAfter.mariadbPid ? share(diff(cpuBefore.mariadb, cpuAfter.mariadb)) : 'unknown (restarted)'}, load generator ${share((generator.user + generator.system) / 1e6)}`
  return { samples: phase.samples, examples: phase.examples, seconds, loadBefore, loadAfter: load(), cpu }
}

/** The app log's counts that grew during a phase. */
function logLines(before: Record<string, number>, after: Record<string, number>): string {
  const grown = Object.entries(after).map(([k, n]) => `${k} ${n - (before[k] ?? 0)}`)
  return `  app log lines: ${grown.join(', ')}`
}

function printPhase(title: string, r: PhaseResult) {
  log(`\n${title} (1-minute load average ${r.loadBefore.split(' ')[0]} before, ${r.loadAfter.split(' ')[0]} after)`)
  for (const line of phaseTable(r.samples, r.seconds)) log(line)
  log(r.cpu)
  if (r.examples.size) log('  what the first failing answer of each kind said:')
  for (const [key, text] of [...r.examples].sort()) log(`    ${key}: ${text}`)
}

/** The fault phase's story: what clients saw while MariaDB was down, and how long the app took to answer again. */
function faultLines(samples: Sample[], at: { stopBegin: number, stopped: number, startBegin: number, started: number }): { lines: string[], recovered: boolean, fiveHundreds: number } {
  const sec = (ms: number) => `${(ms / 1000).toFixed(1)} s`
  const between = (from: number, to: number) => samples.filter(s => s.sentAt >= from && s.sentAt < to)
  const down = between(at.stopped, at.startBegin)
  const downDb = down.filter(s => DATABASE_KINDS.has(s.kind))
  const downPublic = down.filter(s => !DATABASE_KINDS.has(s.kind))
  const all = (xs: Sample[]) => fmtCounts(outcomes(xs, () => true))
  const lines = [
    `  MariaDB stopping at ${sec(at.stopBegin)}, down at ${sec(at.stopped)}, starting at ${sec(at.startBegin)}, up at ${sec(at.started)}`,
    `  while stopping (${sec(at.stopped - at.stopBegin)}): ${all(between(at.stopBegin, at.stopped))}`,
    `  while down, database-backed actions (post, poll, autosave): ${all(downDb)}`,
    `  while down, public pages and search: ${all(downPublic)}`,
    `  while starting (${sec(at.started - at.startBegin)}): ${all(between(at.startBegin, at.started))}`,
  ]
  const anyOk = samples.filter(s => s.doneAt >= at.started && DATABASE_KINDS.has(s.kind) && ok(s)).sort((a, b) => a.doneAt - b.doneAt)[0]
  if (anyOk) lines.push(`  first 2xx of a database-backed action answered after the restart, whenever sent: ${sec(anyOk.doneAt - at.started)} after MariaDB was up`)
  const after = samples.filter(s => s.sentAt >= at.started && DATABASE_KINDS.has(s.kind))
  const firstOk = after.filter(ok).sort((a, b) => a.doneAt - b.doneAt)[0]
  if (firstOk) {
    lines.push(`  first 2xx of a database-backed action sent after the restart: ${sec(firstOk.doneAt - at.started)} after MariaDB was up (${firstOk.kind})`)
    for (const kind of [...DATABASE_KINDS].sort()) {
      const first = after.filter(s => s.kind === kind && ok(s)).sort((a, b) => a.doneAt - b.doneAt)[0]
      lines.push(`    ${kind}: ${first ? `${sec(first.doneAt - at.started)}` : 'no 2xx'}`)
    }
    const later = samples.filter(s => s.sentAt >= firstOk.doneAt)
    lines.push(`  from then to the end: ${later.length} requests, not 2xx: ${fmtCounts(outcomes(later))}`)
  }
  else {
    lines.push(`  no database-backed action answered 2xx after the restart: the app did not recover within the phase`)
  }
  // A time line in 5-second steps, by when the request was sent, database-backed actions apart from the public ones.
  const end = Math.max(...samples.map(s => s.sentAt), 0)
  const cell = (of: Sample[]) => {
    const n = (f: (s: Sample) => boolean) => of.filter(f).length
    return `${n(ok)} / ${n(s => s.status === 503)} / ${n(s => s.status === 500)} / ${n(s => s.status >= 300 && s.status !== 500 && s.status !== 503)} / ${n(s => s.status === 0)}`
  }
  lines.push('  time line by when sent — 2xx / 503 / 500 / other / no answer:')
  lines.push(`    ${'seconds'.padEnd(9)}  ${'database-backed'.padEnd(24)}  public pages and search`)
  for (let t = 0; t < end; t += 5000) {
    const of = between(t, t + 5000)
    const mark = at.stopped < t + 5000 && at.started > t ? '  ← MariaDB down' : ''
    lines.push(`    ${`${t / 1000}–${t / 1000 + 5}`.padEnd(9)}  ${cell(of.filter(s => DATABASE_KINDS.has(s.kind))).padEnd(24)}  ${cell(of.filter(s => !DATABASE_KINDS.has(s.kind)))}${mark}`)
  }
  const fiveHundreds = samples.filter(s => s.status === 500).length
  return { lines, recovered: !!firstOk, fiveHundreds }
}

async function main() {
  const opts = parseSoakOptions(process.argv.slice(2))
  const runId = randomBytes(3).toString('hex')
  log(`Torquewright soak ${runId} — ${new Date().toISOString()}, node ${process.version}, ${cpus().length} cores, load average ${load()}`)
  log(`  ${opts.users} virtual users, ${opts.duration} s steady${opts.fault.enabled ? `, then the fault phase (${opts.fault.at} s, MariaDB down ${opts.fault.down} s, ${opts.fault.after} s after)` : ''}; think ${opts.think.min}–${opts.think.max} ms, timeout ${opts.timeoutMs} ms, at most ${opts.maxRequests} requests a phase`)

  let stack: SoakStack | null = null
  const stopAll = async (code: number) => {
    await stack?.close()
    process.exit(code)
  }
  process.once('SIGINT', () => void stopAll(130))
  process.once('SIGTERM', () => void stopAll(143))

  stack = opts.bases.length ? externalStack(opts) : await ownStack(opts, log)
  const client = new Client(opts.users + 16, opts.timeoutMs)
  const failures: string[] = []
  const reconciliations: Reconciliation[] = []
  try {
    log(`› loading ${stack.bases.join(', ')}`)
    const pop = await preparePopulation(client, stack.bases, opts.users, opts.seed, runId, log)

    let logBefore = stack.logCounts()
    const steady = await runPhase('steady', opts, client, pop, stack, () => sleep(opts.duration * 1000))
    printPhase(`Phase 1 — steady load, ${opts.users} users`, steady)
    if (stack.logFile) log(logLines(logBefore, stack.logCounts()))
    const steadyFailed = steady.samples.filter(s => !ok(s)).length
    if (steadyFailed) failures.push(`phase 1 had ${steadyFailed} answers that were not 2xx (${fmtCounts(outcomes(steady.samples))})`)
    reconciliations.push(await reconcile(stack.dbUrl, pop.ledger, 'steady'))
    log('  reconciliation against MariaDB:')
    for (const line of reconciliationLines(reconciliations.at(-1)!)) log(line)

    const database = stack.database
    if (database) {
      log(`\n› fault phase: MariaDB stopped and started with ${database.describe}`)
      const at = { stopBegin: 0, stopped: 0, startBegin: 0, started: 0 }
      logBefore = stack.logCounts()
      const fault = await runPhase('fault', opts, client, pop, stack, async (phase) => {
        const now = () => performance.now() - phase.startedAt
        await sleep(opts.fault.at * 1000)
        at.stopBegin = now()
        await database.stop()
        at.stopped = now()
        await sleep(opts.fault.down * 1000)
        at.startBegin = now()
        await database.start()
        at.started = now()
        await sleep(opts.fault.after * 1000)
      })
      printPhase(`Phase 2 — the same load, MariaDB down ${opts.fault.down} s`, fault)
      if (stack.logFile) log(logLines(logBefore, stack.logCounts()))
      const story = faultLines(fault.samples, at)
      for (const line of story.lines) log(line)
      if (!story.recovered) failures.push('the app did not answer a database-backed action with 2xx after MariaDB came back')
      if (story.fiveHundreds) log(`  warning: ${story.fiveHundreds} answers were 500 (a database outage should answer 503)`)
      reconciliations.push(await reconcile(stack.dbUrl, pop.ledger, 'fault'))
      log('  reconciliation against MariaDB:')
      for (const line of reconciliationLines(reconciliations.at(-1)!)) log(line)
    }

    for (const r of reconciliations) if (!reconciled(r)) failures.push(`the ${r.phase} phase lost or doubled acknowledged writes`)
    const mail = stack.mailSent()
    if (mail !== null) log(`\noutbox: ${mail} e-mails reached the SMTP sink`)
    if (stack.logFile) log(`app log: ${stack.logFile}`)
    log(`1-minute load average at the end: ${load().split(' ')[0]} (the load generator shares the machine with the app and MariaDB)`)
    log(failures.length ? `\nRESULT: FAIL\n${failures.map(f => `  - ${f}`).join('\n')}` : '\nRESULT: pass')
  }
  finally {
    client.close()
    await stack.close()
  }
  process.exit(failures.length ? 1 : 0)
}

// `--cluster`: the same load through the Galera cluster's balancer, with a node and an instance killed (scripts/lib/soak/cluster-run.ts).
if (process.argv.includes('--cluster')) {
  void import('./lib/soak/cluster-run')
}
else {
  main().catch((err) => {
    console.error(err instanceof UserFacingError ? err.message : err)
    process.exit(1)
  })
}
