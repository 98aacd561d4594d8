/**
 * Benchmark of the search index at 100,000 invented builds: build time and memory, one
 * incremental update, and p50/p95/p99 of a query mix in process and over HTTP, with
 * GET /api/health timed in the same run as the baseline. Figures go in the README.
 * Run alone with `npx tsx bench/search.ts`; `npm run bench` calls benchSearch().
 */
import { loadavg } from 'node:os'
import { resolve } from 'node:path'
import { pathToFileURL } from 'node:url'
import { setFlagsFromString } from 'node:v8'
import { runInNewContext } from 'node:vm'
import { appEnv, buildIfStale, startBuiltServer } from '../scripts/lib/app'
import { loadConfig } from '../scripts/lib/config'
import { ensureDatabase, startMariadb, stopMariadb } from '../scripts/lib/mariadb'
import { waitFor } from '../scripts/lib/process'
import { createSearchIndex, type SearchDocument, type SearchQuery } from '../search/index'
import { seededRandom } from '../shared/random'
import { syntheticDocuments } from '../search/synthetic'
import { termsOf } from '../search/text'

export const BUILDS = 100_000
const PER_CATEGORY = 150
const HTTP_PER_CATEGORY = 60

export interface SearchBenchRow {
  name: string
  figure: string
  target?: string
}

setFlagsFromString('--expose-gc')
const gc = runInNewContext('gc') as () => void

const percentile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))] as number
function summary(times: number[]) {
  const s = [...times].sort((a, b) => a - b)
  return { p50: percentile(s, 0.5), p95: percentile(s, 0.95), p99: percentile(s, 0.99) }
}
const fmt = (ms: number) => (ms < 10 ? ms.toFixed(2) : ms.toFixed(1))
const fmtSummary = (t: ReturnType<typeof summary>) => `p50 ${fmt(t.p50)} · p95 ${fmt(t.p95)} · p99 ${fmt(t.p99)} ms`
/** This process's CPU time in ms: on a shared machine it leaves out the time other work held the cores. */
const cpuMs = () => {
  const u = process.cpuUsage()
  return (u.user + u.system) / 1000
}
/** Times fn in wall-clock and CPU milliseconds. */
function measure(fn: () => void): { wall: number, cpu: number } {
  const c = cpuMs()
  const t = performance.now()
  fn()
  return { wall: performance.now() - t, cpu: cpuMs() - c }
}
const both = (m: { wall: number, cpu: number }[]) => `${fmtSummary(summary(m.map(x => x.wall)))} (cpu p95 ${fmt(summary(m.map(x => x.cpu)).p95)} ms)`

/** The query mix, seeded: each category from the builds' own values and words. */
export function queryMix(docs: SearchDocument[], perCategory = PER_CATEGORY): Record<string, SearchQuery[]> {
  const r = seededRandom(31337)
  const words = [...new Set(docs.slice(0, 3000).flatMap(d => termsOf(`${d.title} ${d.summary} ${d.heads} ${d.intake} ${d.shop.name}`)))].filter(w => w.length >= 5 && /^[a-z]+$/.test(w))
  const families = [...new Set(docs.map(d => d.family))]
  const range = () => {
    const lo = r.int(250, 520)
    return { ciMin: lo, ciMax: lo + r.int(20, 120) }
  }
  const typo = (w: string) => {
    const i = r.int(1, w.length - 2)
    const c = 'abcdefghijklmnopqrstuvwxyz'[r.int(0, 25)] as string
    return w.slice(0, i) + (c === w[i] ? 'q' : c) + w.slice(i + 1)
  }
  const n = (make: () => SearchQuery) => Array.from({ length: perCategory }, make)
  return {
    'filters only': n(() => ({ ...range(), aspiration: [r.pick(['na', 'turbo', 'supercharged', 'nitrous'] as const)], ...(r.next() < 0.5 ? { hpMin: r.int(300, 900) } : {}), ...(r.next() < 0.3 ? { verified: true } : {}), sort: r.pick(['newest', 'price'] as const) })),
    'text plus filters': n(() => ({ q: `${r.pick(words)}${r.next() < 0.4 ? ` ${r.pick(words)}` : ''} `, ...(r.next() < 0.7 ? range() : {}), ...(r.next() < 0.4 ? { fuel: [r.pick(['e85', 'race_gas', 'pump_gas', 'methanol'] as const)] } : {}) })),
    'as-you-type prefixes': n(() => {
      const w = r.pick(words)
      return { q: `${r.next() < 0.5 ? `${r.pick(words)} ` : ''}${w.slice(0, r.int(2, w.length - 1))}` }
    }),
    'typos': n(() => ({ q: `${typo(r.pick(words))} `, ...(r.next() < 0.3 ? range() : {}) })),
    'facets (broad filters)': n(() => ({ ...(r.next() < 0.5 ? { family: [r.pick(families)] } : {}), ...(r.next() < 0.5 ? { verified: true } : {}), perPage: 24 })),
    'band sort': n(() => {
      const from = r.int(25, 45) * 100
      return { bandFrom: from, bandTo: from + r.int(15, 35) * 100, sort: 'band' as const, ...(r.next() < 0.6 ? range() : {}), ...(r.next() < 0.4 ? { aspiration: [r.pick(['na', 'turbo'] as const)] } : {}) }
    }),
  }
}

/** URL query string of a search, repeated parameters for lists. */
export function toQueryString(q: SearchQuery): string {
  const params = new URLSearchParams()
  for (const [key, value] of Object.entries(q)) {
    if (value === undefined) continue
    for (const v of Array.isArray(value) ? value : [value]) params.append(key, String(v))
  }
  return params.toString()
}

function inProcess(docs: SearchDocument[], mix: Record<string, SearchQuery[]>): SearchBenchRow[] {
  const rows: SearchBenchRow[] = []
  gc()
  const before = process.memoryUsage()
  const index = createSearchIndex()
  const first = measure(() => index.build(docs))
  gc()
  const after = process.memoryUsage()
  const memoryMb = (after.heapUsed - before.heapUsed + after.arrayBuffers - before.arrayBuffers) / 1e6
  const rebuild = measure(() => index.build(docs))
  rows.push({
    name: `index build, ${docs.length.toLocaleString('en-US')} builds (first / full rebuild)`,
    figure: `${(first.wall / 1000).toFixed(2)} s / ${(rebuild.wall / 1000).toFixed(2)} s (cpu ${(first.cpu / 1000).toFixed(2)} s / ${(rebuild.cpu / 1000).toFixed(2)} s)`,
    target: 'rebuild < 10 s',
  })
  rows.push({ name: 'index memory (heap + typed arrays)', figure: `${memoryMb.toFixed(0)} MB` })

  for (const list of Object.values(mix)) for (const q of list.slice(0, 10)) index.query(q)
  const all: { wall: number, cpu: number }[] = []
  for (const [category, list] of Object.entries(mix)) {
    const times = list.map(q => measure(() => index.query(q)))
    all.push(...times)
    rows.push({ name: `in-process query: ${category}`, figure: both(times) })
  }
  rows.push({ name: 'in-process query: whole mix', figure: both(all), target: 'p95 < 5 ms' })

  const r = seededRandom(5)
  const updates = Array.from({ length: 400 }, () => {
    const d = docs[r.int(0, docs.length - 1)] as SearchDocument
    const doc = { ...d, title: `${d.title} rev`, displacementCi: d.displacementCi + r.between(-20, 20), priceCents: d.priceCents + 100 }
    return measure(() => index.upsert(doc))
  })
  rows.push({ name: 'incremental update (upsert of an edited build)', figure: both(updates), target: 'one update < 5 ms' })
  const removals = Array.from({ length: 200 }, (_, i) => measure(() => index.remove((docs[i * 97] as SearchDocument).id)))
  rows.push({ name: 'incremental removal', figure: both(removals) })
  return rows
}

async function timed(url: string): Promise<number> {
  const t = performance.now()
  const res = await fetch(url)
  await res.arrayBuffer()
  if (!res.ok) throw new Error(`${url} answered ${res.status}`)
  return performance.now() - t
}

/** The HTTP part: the built server with a bench-only synthetic index (see README), over MariaDB for /api/health. */
async function overHttp(mix: Record<string, SearchQuery[]>): Promise<SearchBenchRow[]> {
  const cfg = loadConfig()
  await buildIfStale(cfg)
  const startedDb = await startMariadb(cfg)
  const database = 'torquewright_bench'
  ensureDatabase(cfg, database)
  const port = cfg.app.port + 7
  const server = await startBuiltServer(cfg, appEnv(cfg, {
    database, port, smtpPort: cfg.mail.smtpPort, uploadsDir: resolve(cfg.dataDir, 'bench-uploads'),
    extra: { TW_BENCH: '1', TW_SEARCH_SYNTHETIC: String(BUILDS) },
  }), 'pipe')
  const base = `http://127.0.0.1:${port}`
  try {
    await waitFor('the bench index', async () => {
      const res = await fetch(`${base}/api/search?perPage=1`)
      return res.ok && (await res.json() as { total: number }).total === BUILDS
    }, 300_000)
    for (const list of Object.values(mix)) for (const q of list.slice(0, 5)) await timed(`${base}/api/search?${toQueryString(q)}`)
    const route: number[] = []
    const health: number[] = []
    for (const list of Object.values(mix)) {
      for (const q of list.slice(0, HTTP_PER_CATEGORY)) {
        route.push(await timed(`${base}/api/search?${toQueryString(q)}`))
        health.push(await timed(`${base}/api/health`))
      }
    }
    const routeS = summary(route)
    const healthS = summary(health)
    return [
      { name: 'GET /api/health (baseline, same run)', figure: fmtSummary(healthS) },
      { name: 'GET /api/search, whole mix', figure: `${fmtSummary(routeS)} (p95 ${(routeS.p95 / healthS.p95).toFixed(1)}× health)`, target: 'p95 within 3× health' },
    ]
  }
  finally {
    server.kill('SIGTERM')
    if (startedDb) await stopMariadb(cfg)
  }
}

/** Every search figure of the README table. */
export async function benchSearch(opts: { http?: boolean } = {}): Promise<SearchBenchRow[]> {
  const t0 = performance.now()
  const docs = syntheticDocuments(BUILDS)
  const generated = performance.now() - t0
  const mix = queryMix(docs)
  const rows = inProcess(docs, mix)
  rows.unshift({ name: `generate ${BUILDS.toLocaleString('en-US')} invented builds`, figure: `${(generated / 1000).toFixed(1)} s (not part of the index)` })
  if (opts.http !== false) {
    try {
      rows.push(...await overHttp(mix))
    }
    catch (err) {
      rows.push({ name: 'GET /api/search (route part)', figure: `not measured: ${(err as Error).message}` })
    }
  }
  rows.push({ name: 'machine load during the run (1-min load average, 2 cores)', figure: loadavg()[0]!.toFixed(1) })
  return rows
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const rows = await benchSearch({ http: !process.argv.includes('--no-http') })
  for (const r of rows) console.log(`${r.name.padEnd(62)} ${r.figure}${r.target ? `   [target: ${r.target}]` : ''}`)
}
