/**
 * How the search engine was chosen: the same invented builds and query mix through each
 * candidate (@orama/orama, minisearch, flexsearch), a plain typed-array scan as the floor, and
 * Torquewright's index. Slow: a candidate's category stops after its time budget.
 * Run with `npm run bench:candidates [-- 20000]`; the README's table comes from it.
 */
import { loadavg } from 'node:os'
import { setFlagsFromString } from 'node:v8'
import { runInNewContext } from 'node:vm'
import { create, insertMultiple, search as oramaSearch } from '@orama/orama'
import FlexSearch from 'flexsearch'
import MiniSearch from 'minisearch'
import { createSearchIndex, type SearchDocument } from '../search/index'
import { seededRandom } from '../shared/random'
import { syntheticDocuments } from '../search/synthetic'
import { termsOf } from '../search/text'

setFlagsFromString('--expose-gc')
const gc = runInNewContext('gc') as () => void
const N = Number(process.argv[2] ?? 100_000)
const QUERIES = 40
const BUDGET_MS = 20_000

interface Queries { filter: { ciMin: number, ciMax: number, aspiration: string }[], text: string[], typo: string[] }
type Engine = {
  name: string
  build: (docs: SearchDocument[]) => Promise<void> | void
  filter?: (q: Queries['filter'][number]) => Promise<unknown> | unknown
  text?: (q: string) => Promise<unknown> | unknown
  typo?: (q: string) => Promise<unknown> | unknown
  facets?: (q: Queries['filter'][number]) => Promise<unknown> | unknown
}

const body = (d: SearchDocument) => [d.summary, ...d.parts, d.heads, d.camshaft, d.intake, d.shop.name].join(' ')

function makeQueries(docs: SearchDocument[]): Queries {
  const r = seededRandom(77)
  const words = [...new Set(docs.slice(0, 2000).flatMap(d => termsOf(`${d.title} ${d.summary} ${d.shop.name}`)))].filter(w => w.length >= 5 && /^[a-z]+$/.test(w))
  const typo = (w: string) => {
    const i = r.int(1, w.length - 2)
    return w.slice(0, i) + (w[i] === 'x' ? 'y' : 'x') + w.slice(i + 1)
  }
  return {
    filter: Array.from({ length: QUERIES }, () => {
      const lo = r.int(250, 520)
      return { ciMin: lo, ciMax: lo + r.int(20, 120), aspiration: r.pick(['na', 'turbo', 'supercharged', 'nitrous']) }
    }),
    text: Array.from({ length: QUERIES }, () => `${r.pick(words)}${r.next() < 0.4 ? ` ${r.pick(words)}` : ''}`),
    typo: Array.from({ length: QUERIES }, () => typo(r.pick(words))),
  }
}

function scanEngine(): Engine {
  let ci = new Float64Array(0)
  let asp = new Uint8Array(0)
  let fuel = new Uint8Array(0)
  const codes = new Map(['na', 'turbo', 'supercharged', 'nitrous'].map((a, i) => [a, i]))
  const fuels = new Map(['pump_gas', 'race_gas', 'e85', 'methanol'].map((a, i) => [a, i]))
  const run = (q: Queries['filter'][number]) => {
    const want = codes.get(q.aspiration)
    const a = new Int32Array(4)
    const f = new Int32Array(4)
    let total = 0
    for (let i = 0; i < ci.length; i++) {
      const c = ci[i] as number
      if (c < q.ciMin || c > q.ciMax || asp[i] !== want) continue
      total++
      a[asp[i] as number]!++
      f[fuel[i] as number]!++
    }
    return total
  }
  return {
    name: 'typed-array scan (unsorted columns)',
    build(docs) {
      ci = Float64Array.from(docs, d => d.displacementCi)
      asp = Uint8Array.from(docs, d => codes.get(d.aspiration) ?? 0)
      fuel = Uint8Array.from(docs, d => fuels.get(d.fuel) ?? 0)
    },
    filter: run,
    facets: run,
  }
}

function oursEngine(): Engine {
  const index = createSearchIndex()
  return {
    name: 'Torquewright index (sorted columns + MiniSearch term matching)',
    build: docs => index.build(docs),
    filter: q => index.query({ ciMin: q.ciMin, ciMax: q.ciMax, aspiration: [q.aspiration as 'na'] }),
    text: q => index.query({ q }),
    typo: q => index.query({ q: `${q} ` }),
    facets: q => index.query({ ciMin: q.ciMin, ciMax: q.ciMax }),
  }
}

function miniSearchEngine(): Engine {
  const ms = new MiniSearch<SearchDocument>({ fields: ['title', 'body'], storeFields: [], extractField: (d, f) => (f === 'body' ? body(d) : f === 'id' ? d.id : String((d as unknown as Record<string, unknown>)[f])) })
  let byId = new Map<number, SearchDocument>()
  return {
    name: 'minisearch 7.2 (text, filters as a callback)',
    build(docs) {
      byId = new Map(docs.map(d => [d.id, d]))
      ms.addAll(docs)
    },
    filter: q => ms.search(MiniSearch.wildcard, { filter: (r) => {
      const d = byId.get(r.id) as SearchDocument
      return d.displacementCi >= q.ciMin && d.displacementCi <= q.ciMax && d.aspiration === q.aspiration
    } }).length,
    text: q => ms.search(q, { prefix: true, combineWith: 'AND' }).length,
    typo: q => ms.search(q, { fuzzy: 0.2, combineWith: 'AND' }).length,
  }
}

function oramaEngine(): Engine {
  const db = create({ schema: { title: 'string', body: 'string', ci: 'number', aspiration: 'enum', fuel: 'enum', family: 'enum' } as const })
  return {
    name: '@orama/orama 3.1.18',
    async build(docs) {
      await insertMultiple(db, docs.map(d => ({ id: String(d.id), title: d.title, body: body(d), ci: d.displacementCi, aspiration: d.aspiration, fuel: d.fuel, family: d.family })), 1000)
    },
    filter: q => oramaSearch(db, { term: '', where: { ci: { between: [q.ciMin, q.ciMax] }, aspiration: { eq: q.aspiration } }, limit: 24 }),
    text: q => oramaSearch(db, { term: q, properties: ['title', 'body'], limit: 24 }),
    typo: q => oramaSearch(db, { term: q, properties: ['title', 'body'], tolerance: 1, limit: 24 }),
    facets: q => oramaSearch(db, { term: '', where: { ci: { between: [q.ciMin, q.ciMax] } }, facets: { aspiration: {}, fuel: {}, family: {} }, limit: 24 }),
  }
}

function flexEngine(): Engine {
  const index = new FlexSearch.Document({ document: { id: 'id', index: ['title', 'body'] }, tokenize: 'forward' })
  return {
    name: 'flexsearch 0.8 (text only; no typo tolerance)',
    build(docs) {
      for (const d of docs) index.add({ id: d.id, title: d.title, body: body(d) })
    },
    text: q => index.search(q, { limit: 24 }),
  }
}

async function time(list: unknown[], fn: ((q: never) => unknown) | undefined): Promise<string> {
  if (!fn) return '—'
  for (const q of list.slice(0, 3)) await fn(q as never)
  const times: number[] = []
  const t0 = performance.now()
  for (const q of list) {
    const t = performance.now()
    await fn(q as never)
    times.push(performance.now() - t)
    if (performance.now() - t0 > BUDGET_MS) break
  }
  times.sort((a, b) => a - b)
  const p95 = times[Math.min(times.length - 1, Math.floor(0.95 * times.length))] as number
  return `${p95 < 10 ? p95.toFixed(2) : p95.toFixed(0)} ms${times.length < list.length ? ` (${times.length} of ${list.length} in budget)` : ''}`
}

const docs = syntheticDocuments(N)
const queries = makeQueries(docs)
console.log(`| engine (${N.toLocaleString('en-US')} builds) | build | heap + buffers | filter p95 | text p95 | typo p95 | facets p95 |`)
console.log('|---|---|---|---|---|---|---|')
for (const make of [scanEngine, oursEngine, miniSearchEngine, oramaEngine, flexEngine]) {
  gc()
  const before = process.memoryUsage()
  const engine = make()
  const t = performance.now()
  await engine.build(docs)
  const buildS = (performance.now() - t) / 1000
  gc()
  const after = process.memoryUsage()
  const mb = (after.heapUsed - before.heapUsed + after.arrayBuffers - before.arrayBuffers) / 1e6
  const cells = [
    await time(queries.filter, engine.filter), await time(queries.text, engine.text),
    await time(queries.typo, engine.typo), await time(queries.filter, engine.facets),
  ]
  console.log(`| ${engine.name} | ${buildS.toFixed(2)} s | ${mb.toFixed(0)} MB | ${cells.join(' | ')} |`)
}
console.log(`\n(1-min load average at the end: ${loadavg()[0]!.toFixed(1)} on 2 cores)`)
