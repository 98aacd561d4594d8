// `npm run soak -- --cluster`: the mixed load through HAProxy in front of three app instances on a
// three-node Galera cluster (scripts/lib/cluster.ts). In the middle one Galera node and one app instance
// are killed (SIGKILL, by pid) and brought back. Beside the load a probe edits a published build's
// title on instance A and times how long until instance B's search finds it. At the end every
// acknowledged write is reconciled against MariaDB. README "Scaling out" keeps the figures.
import { randomBytes } from 'node:crypto'
import { cpus, loadavg } from 'node:os'
import { parseArgs } from 'node:util'
import mysql from 'mysql2/promise'
import { DEMO_PASSWORD, DEMO_RACERS, DEMO_SHOPS } from '../demo-data'
import { buildIfStale } from '../app'
import { clusterOptions, startCluster, type Cluster } from '../cluster'
import { loadConfig } from '../config'
import { UserFacingError } from '../process'
import { Client, CookieJar, json, signIn } from './http'
import { DATABASE_KINDS, preparePopulation, runUser, type PhaseRun } from './load'
import { reconcile, reconciled, reconciliationLines } from './reconcile'
import { fmtCounts, ok, outcomes, percentile, phaseTable } from './stats'

const log = (line: string) => console.log(line)
const sleep = (ms: number) => new Promise<void>(r => setTimeout(r, ms))

interface Probe {
  /** ms from the edit's 200 on instance A until instance B's search found the new word; null when it never did within the bound. */
  lagMs: number | null
  sentAt: number
  status: number
}

/** Edits one published build's title on instance A every second and times until instance B's search has the new word. */
async function runProbe(client: Client, cluster: Cluster, phase: PhaseRun, probes: Probe[]): Promise<void> {
  const [a, b] = [cluster.apps[0]!, cluster.apps[1]!]
  const shop = DEMO_SHOPS[0]!
  const jar = new CookieJar()
  const address = '10.250.0.1'
  const refused = await signIn(client, a.base, jar, address, shop.owner.email, DEMO_PASSWORD)
  if (refused) throw new Error(`the probe could not sign in on ${a.name}: ${refused}`)
  const connection = await mysql.createConnection({ uri: cluster.dbUrl })
  const [rows] = await connection.query(
    'select b.id, b.title from builds b join builder_profiles p on p.id = b.builder_id where b.status = \'published\' and p.slug = ? order by b.id limit 1', [shop.slug],
  ) as unknown as [{ id: number, title: string }[]]
  await connection.end()
  const build = rows[0]
  if (!build) throw new Error(`the probe found no published build of ${shop.slug}`)
  const base = build.title.slice(0, 100)
  while (!phase.stop) {
    const word = `zp${randomBytes(4).toString('hex')}`
    const sentAt = performance.now() - phase.startedAt
    const res = await client.send(`${a.base}/api/me/builds/${build.id}`, {
      method: 'PATCH', jar, headers: { 'x-forwarded-for': address, 'content-type': 'application/json' }, body: JSON.stringify({ title: `${base} ${word}` }),
    })
    if (res.status !== 200) {
      probes.push({ lagMs: null, sentAt, status: res.status })
      await sleep(1000)
      continue
    }
    const acked = performance.now()
    let lag: number | null = null
    while (performance.now() - acked < 10_000) {
      const found = await client.send(`${b.base}/api/search?q=${word}&perPage=1`, { headers: { 'x-forwarded-for': '10.250.0.2' } })
      if ((json<{ total?: number }>(found)?.total ?? 0) >= 1) {
        lag = performance.now() - acked
        break
      }
      await sleep(20)
    }
    probes.push({ lagMs: lag, sentAt, status: 200 })
    await sleep(Math.max(0, 1000 - (performance.now() - acked)))
  }
}

/**
 * Sessions across instances: a sign-in on A is honoured on B; a password change made on B signs out
 * the account's other session (started on C) on every instance, and the changer's own renewed cookie
 * goes on working. The password is set back at the end, before the load signs in.
 */
async function checkSessions(client: Client, cluster: Cluster): Promise<string[]> {
  const [a, b, c] = cluster.apps as [typeof cluster.apps[0], typeof cluster.apps[0], typeof cluster.apps[0]]
  const email = DEMO_RACERS.at(-1)!.email
  const address = '10.250.1.1'
  const headers = { 'x-forwarded-for': address, 'content-type': 'application/json' }
  const [x, y] = [new CookieJar(), new CookieJar()]
  const lines: string[] = []
  const problems: string[] = []
  const expect = (what: string, got: number, want: number) => {
    lines.push(`  ${what}: ${got}${got === want ? '' : ` (expected ${want})`}`)
    if (got !== want) problems.push(`${what} answered ${got}, not ${want}`)
  }
  const refusedX = await signIn(client, a.base, x, address, email, DEMO_PASSWORD)
  const refusedY = await signIn(client, c.base, y, address, email, DEMO_PASSWORD)
  if (refusedX || refusedY) return [`sign-in for the session check failed: ${refusedX ?? refusedY}`]
  const me = (base: string, jar: CookieJar) => client.send(`${base}/api/me`, { jar, headers })
  expect(`signed in on ${a.name}, GET /api/me on ${b.name}`, (await me(b.base, x)).status, 200)
  const changed = await client.send(`${b.base}/api/me/password`, { method: 'POST', jar: x, headers, body: JSON.stringify({ currentPassword: DEMO_PASSWORD, newPassword: `${DEMO_PASSWORD}-changed` }) })
  expect(`password changed on ${b.name}`, changed.status, 200)
  expect(`the other session (signed in on ${c.name}) on ${a.name} afterwards`, (await me(a.base, y)).status, 401)
  expect(`the other session on ${c.name} afterwards`, (await me(c.base, y)).status, 401)
  expect(`the changer's renewed session on ${c.name}`, (await me(c.base, x)).status, 200)
  const back = await client.send(`${a.base}/api/me/password`, { method: 'POST', jar: x, headers, body: JSON.stringify({ currentPassword: `${DEMO_PASSWORD}-changed`, newPassword: DEMO_PASSWORD }) })
  expect(`password set back on ${a.name}`, back.status, 200)
  return problems.length ? problems : lines
}

async function main() {
  const { values } = parseArgs({
    args: process.argv.slice(2).filter(a => a !== '--cluster'),
    options: {
      'duration': { type: 'string', default: '60' },
      'users': { type: 'string', default: '30' },
      'kill-at': { type: 'string', default: '20' },
      'down': { type: 'string', default: '12' },
      'seed': { type: 'string', default: '1' },
    },
  })
  const duration = Number(values.duration)
  const users = Number(values.users)
  const killAt = Number(values['kill-at'])
  const down = Number(values.down)
  if (![duration, users, killAt, down].every(n => Number.isFinite(n) && n > 0) || killAt + down >= duration) throw new UserFacingError('--duration, --users, --kill-at and --down are positive numbers, kill-at + down below duration')
  const runId = randomBytes(3).toString('hex')
  log(`Torquewright cluster soak ${runId} — ${new Date().toISOString()}, node ${process.version}, ${cpus().length} cores, load average ${loadavg()[0]!.toFixed(2)}`)
  await buildIfStale(loadConfig())
  const cluster = await startCluster(clusterOptions({ instances: 3 }))
  const client = new Client(users + 16, 10_000)
  const failures: string[] = []
  try {
    log('› sessions across instances:')
    const sessionLines = await checkSessions(client, cluster)
    for (const line of sessionLines) log(line)
    if (!sessionLines.every(l => l.startsWith('  '))) failures.push(...sessionLines)
    const pop = await preparePopulation(client, [cluster.base], users, Number(values.seed), runId, log)
    // Node 1 is the one every instance writes through: its death moves them all to node 2.
    const node = cluster.nodes[0]!
    const app = cluster.apps[2]!
    const at = { killed: 0, nodeBack: 0, appBack: 0 }
    const probes: Probe[] = []
    const phase: PhaseRun = { name: 'cluster', startedAt: performance.now(), samples: [], stop: false, budget: 2_000_000, examples: new Map() }
    log(`› ${users} virtual users through ${cluster.base} for ${duration} s; at ${killAt} s ${node.name} and ${app.name} are killed, ${down} s later started again`)
    const now = () => performance.now() - phase.startedAt
    const control = (async () => {
      await sleep(killAt * 1000)
      at.killed = now()
      const nodePid = cluster.killNode(node)
      const appPid = cluster.killApp(app)
      log(`  ${(at.killed / 1000).toFixed(1)} s: SIGKILL to ${node.name} (pid ${nodePid}) and ${app.name} (pid ${appPid}); cluster size now ${cluster.clusterSize()}`)
      await sleep(down * 1000)
      await Promise.all([
        cluster.startNode(node).then(() => {
          at.nodeBack = now()
        }),
        cluster.startApp(app).then(() => {
          at.appBack = now()
        }),
      ])
      log(`  ${node.name} Synced again at ${(at.nodeBack / 1000).toFixed(1)} s (cluster size ${cluster.clusterSize()}); ${app.name} healthy at ${(at.appBack / 1000).toFixed(1)} s`)
      await sleep(Math.max(0, duration * 1000 - now()))
    })()
    const all = Promise.all([...pop.users.map(u => runUser(client, u, pop, phase, { min: 500, max: 1500 })), runProbe(client, cluster, phase, probes)])
    await Promise.race([control, all])
    phase.stop = true
    await all
    await control
    const seconds = now() / 1000

    log(`\nLoad through the balancer, ${users} users, ${seconds.toFixed(1)} s`)
    for (const line of phaseTable(phase.samples, seconds)) log(line)
    const between = (from: number, to: number) => phase.samples.filter(s => s.sentAt >= from && s.sentAt < to)
    const back = Math.max(at.nodeBack, at.appBack)
    log(`  before the kill: ${fmtCounts(outcomes(between(0, at.killed), () => true))}`)
    log(`  while ${node.name} and ${app.name} were down or coming back (${(at.killed / 1000).toFixed(1)}–${(back / 1000).toFixed(1)} s): ${fmtCounts(outcomes(between(at.killed, back), () => true))}`)
    log(`    of them database-backed: ${fmtCounts(outcomes(between(at.killed, back).filter(s => DATABASE_KINDS.has(s.kind)), () => true))}`)
    log(`  after both were back: ${fmtCounts(outcomes(between(back, Infinity), () => true))}`)
    if (phase.examples.size) log('  what the first failing answer of each kind said:')
    for (const [key, text] of [...phase.examples].sort()) log(`    ${key}: ${text}`)
    const fiveHundreds = phase.samples.filter(s => s.status === 500).length
    if (fiveHundreds) failures.push(`${fiveHundreds} answers were 500`)
    const afterOk = between(back + 2000, Infinity)
    if (afterOk.some(s => !ok(s))) failures.push(`after the restart ${afterOk.filter(s => !ok(s)).length} answers were not 2xx`)

    const lags = probes.filter(p => p.lagMs !== null).map(p => p.lagMs!).sort((x, y) => x - y)
    const missed = probes.filter(p => p.status === 200 && p.lagMs === null).length
    log(`\nA write on ${cluster.apps[0]!.name} searchable on ${cluster.apps[1]!.name}: ${probes.length} edits, ${lags.length} found; p50 ${percentile(lags, 0.5).toFixed(0)} ms, p99 ${percentile(lags, 0.99).toFixed(0)} ms, max ${(lags.at(-1) ?? NaN).toFixed(0)} ms; not found within 10 s: ${missed}; edits refused: ${probes.filter(p => p.status !== 200).length}`)
    log(`  each edit's delay in ms, in order: ${probes.map(p => (p.lagMs === null ? (p.status === 200 ? 'not found' : `refused ${p.status || 'no answer'}`) : p.lagMs.toFixed(0))).join(', ')}`)
    const quiet = probes.filter(p => p.lagMs !== null && (p.sentAt < at.killed || p.sentAt > back)).map(p => p.lagMs!).sort((x, y) => x - y)
    log(`  outside the failure window: p50 ${percentile(quiet, 0.5).toFixed(0)} ms, max ${(quiet.at(-1) ?? NaN).toFixed(0)} ms over ${quiet.length} edits`)
    if (missed) failures.push(`${missed} edits were not searchable on the other instance within 10 s`)
    if ((quiet.at(-1) ?? 0) > 1000) failures.push('an edit outside the failure window took more than 1 s to be searchable on the other instance')

    const r = await reconcile(cluster.dbUrl, pop.ledger, 'cluster')
    log('\nReconciliation against MariaDB (node 1):')
    for (const line of reconciliationLines(r)) log(line)
    if (!reconciled(r)) failures.push('acknowledged writes were lost or doubled')
    // Every node holds the same rows once the restarted one is Synced. A request the client gave up on
    // may still be finishing on the server: wait out the client timeout, and read each node causally (wsrep_sync_wait).
    await sleep(10_000)
    const counts: string[] = []
    const galera: string[] = []
    for (const n of cluster.nodes) {
      const c = await mysql.createConnection({ uri: cluster.dbUrl.replace(`:${cluster.nodes[0]!.port}/`, `:${n.port}/`) })
      await c.query('SET SESSION wsrep_sync_wait = 1')
      const [status] = await c.query('SHOW STATUS WHERE Variable_name IN (\'wsrep_replicated\', \'wsrep_local_cert_failures\', \'wsrep_local_bf_aborts\', \'wsrep_flow_control_paused\')') as unknown as [{ Variable_name: string, Value: string }[]]
      galera.push(`${n.name}: ${status.map(v => `${v.Variable_name.replace('wsrep_', '')} ${v.Value}`).join(', ')}`)
      const [[row]] = await c.query('select (select count(*) from request_messages) as m, (select count(*) from builds) as b, (select coalesce(max(id), 0) from build_changes) as f') as unknown as [[{ m: number, b: number, f: number }]]
      counts.push(`${n.name}: ${row.m} messages, ${row.b} builds, feed at ${row.f}`)
      await c.end()
    }
    log(`  rows on each node: ${counts.join('; ')}`)
    log(`  Galera counters (since each node's last start): ${galera.join('; ')}`)
    if (new Set(counts.map(c => c.replace(/^node\d: /, ''))).size !== 1) failures.push('the nodes do not hold the same rows')
    log(`outbox: ${cluster.mailSent()} e-mails reached the SMTP sink`)
    log(`1-minute load average at the end: ${loadavg()[0]!.toFixed(2)} (load generator, three app instances, three MariaDB nodes and HAProxy share ${cpus().length} cores)`)
    log(failures.length ? `\nRESULT: FAIL\n${failures.map(f => `  - ${f}`).join('\n')}` : '\nRESULT: pass')
  }
  finally {
    client.close()
    await cluster.close()
  }
  process.exit(failures.length ? 1 : 0)
}

main().catch((err) => {
  console.error(err instanceof UserFacingError ? err.message : err)
  process.exit(1)
})
