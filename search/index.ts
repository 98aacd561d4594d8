/**
 * Torquewright's embedded search index: numbers and facets in typed-array columns kept in
 * displacement order, words in the text index beside them (search/text.ts), power curves on a
 * fixed rpm grid for band queries. Pure and in-process: relative imports only, so the server,
 * the unit tests and the bench all use this same module. See README "Search".
 */
import { MAX_RESULT_WINDOW } from '../shared/schemas/search'
import { CurveStore, Dictionary, grown, TopK } from './columns'
import { TextIndex } from './text'
import {
  ASPIRATIONS, CURVE_MIN_RPM, CURVE_STEP_RPM, FUELS, USES,
  type IndexedEntry, type SearchDocument, type SearchFacets, type SearchHit, type SearchIndex, type SearchQuery, type SearchResult, type SearchSort,
} from './types'

export * from './types'
export { MAX_RESULT_WINDOW }

/** hpTarget without hpTolerance keeps builds within this fraction of the target. */
export const DEFAULT_TARGET_TOLERANCE = 0.1
/** The deepest result a query may page to (page × perPage). */

type Stored = Omit<SearchHit, 'publishedAt' | 'bandAvgHp' | 'score'> & { publishedAt: number, stamp: string }

const ASPIRATION_CODE = new Map<string, number>(ASPIRATIONS.map((a, i) => [a, i]))
const FUEL_CODE = new Map<string, number>(FUELS.map((f, i) => [f, i]))
const USE_CODE = new Map<string, number>(USES.map((u, i) => [u, i]))

/** The columns kept in displacement order (then id), one entry per indexed document. */
function positionColumns(size: number) {
  return {
    slot: new Int32Array(size),
    ci: new Float64Array(size),
    id: new Float64Array(size),
    hp: new Float64Array(size),
    tq: new Float64Array(size),
    price: new Float64Array(size),
    published: new Float64Array(size),
    aspiration: new Uint8Array(size),
    fuel: new Uint8Array(size),
    use: new Uint8Array(size),
    verified: new Uint8Array(size),
    family: new Uint32Array(size),
    region: new Uint32Array(size),
  }
}
type Columns = ReturnType<typeof positionColumns>

/** A bit mask of allowed codes, or -1 (everything) when the list is empty. */
/** The mask of a filter that is absent: every code allowed. */
const ALL = -1

function maskOf(values: readonly string[] | undefined, codes: Map<string, number>): number {
  if (!values || values.length === 0) return ALL
  let mask = 0
  for (const v of values) {
    const c = codes.get(v)
    if (c !== undefined) mask |= 1 << c
  }
  return mask
}

class EmbeddedIndex implements SearchIndex {
  private capacity = 0
  private count = 0
  private slotOfId = new Map<number, number>()
  private freeSlots: number[] = []
  private nextSlot = 0
  private stored: (Stored | undefined)[] = []
  private positionOfSlot = new Int32Array(0)
  private curves = new CurveStore()
  private cols: Columns = positionColumns(0)
  private families = new Dictionary()
  private regions = new Dictionary()
  private text = new TextIndex()

  get size(): number {
    return this.count
  }

  private reserve(slots: number): void {
    if (slots <= this.capacity) return
    const size = Math.max(slots, this.capacity * 2, 64)
    this.positionOfSlot = grown(this.positionOfSlot, size)
    this.curves.reserve(size)
    for (const key of Object.keys(this.cols) as (keyof Columns)[]) {
      (this.cols as Record<keyof Columns, Columns[keyof Columns]>)[key] = grown(this.cols[key], size)
    }
    this.text.reserve(size)
    this.capacity = size
  }

  private allocateSlot(): number {
    const slot = this.freeSlots.pop() ?? this.nextSlot++
    this.reserve(slot + 1)
    return slot
  }

  /** Writes everything kept per slot: the stored hit fields, the curve and the words. */
  private writeSlot(slot: number, doc: SearchDocument): void {
    this.stored[slot] = {
      id: doc.id, slug: doc.slug, title: doc.title, shop: { slug: doc.shop.slug, name: doc.shop.name },
      family: doc.family, region: doc.region, use: doc.use, displacementCi: doc.displacementCi,
      peakHp: doc.peakHp, peakHpRpm: doc.peakHpRpm, peakTq: doc.peakTq, peakTqRpm: doc.peakTqRpm,
      aspiration: doc.aspiration, fuel: doc.fuel, verified: doc.verified, priceCents: doc.priceCents,
      publishedAt: doc.publishedAt, stamp: doc.stamp,
    }
    if (doc.curve && doc.curve.hp.length > 0) this.curves.set(slot, Math.round((doc.curve.startRpm - CURVE_MIN_RPM) / CURVE_STEP_RPM), doc.curve.hp)
    else this.curves.clear(slot)
    this.text.add(slot, {
      title: doc.title, summary: doc.summary, parts: doc.parts, heads: doc.heads,
      camshaft: doc.camshaft, intake: doc.intake, shop: doc.shop.name,
    })
    this.families.retain(this.families.code(doc.family))
    this.regions.retain(this.regions.code(doc.region))
  }

  /** Copies a slot's filter fields into position p of the columns. */
  private writePosition(p: number, slot: number): void {
    const s = this.stored[slot] as Stored
    const c = this.cols
    c.slot[p] = slot
    c.ci[p] = s.displacementCi
    c.id[p] = s.id
    c.hp[p] = s.peakHp ?? Number.NaN
    c.tq[p] = s.peakTq ?? Number.NaN
    c.price[p] = s.priceCents
    c.published[p] = s.publishedAt
    c.aspiration[p] = ASPIRATION_CODE.get(s.aspiration) ?? 0
    c.fuel[p] = FUEL_CODE.get(s.fuel) ?? 0
    c.use[p] = USE_CODE.get(s.use) ?? 0
    c.verified[p] = s.verified ? 1 : 0
    c.family[p] = this.families.code(s.family)
    c.region[p] = this.regions.code(s.region)
    this.positionOfSlot[slot] = p
  }

  /** First position whose (ci, id) is not below the given pair. */
  private lowerBound(ci: number, id: number): number {
    let lo = 0
    let hi = this.count
    const { ci: cis, id: ids } = this.cols
    while (lo < hi) {
      const mid = (lo + hi) >> 1
      const c = cis[mid] as number
      if (c < ci || (c === ci && (ids[mid] as number) < id)) lo = mid + 1
      else hi = mid
    }
    return lo
  }

  /** Opens (+1) or closes (−1) a gap at position p by moving the columns after it. */
  private shift(p: number, direction: 1 | -1): void {
    for (const column of Object.values(this.cols)) {
      if (direction === 1) column.copyWithin(p + 1, p, this.count)
      else column.copyWithin(p, p + 1, this.count)
    }
    const slots = this.cols.slot
    const end = direction === 1 ? this.count + 1 : this.count - 1
    for (let q = direction === 1 ? p + 1 : p; q < end; q++) this.positionOfSlot[slots[q] as number] = q
  }

  private forgetSlot(slot: number): void {
    const s = this.stored[slot] as Stored
    this.text.remove(slot)
    this.curves.clear(slot)
    const family = this.families.find(s.family)
    if (family !== undefined) this.families.release(family)
    const region = this.regions.find(s.region)
    if (region !== undefined) this.regions.release(region)
    const p = this.positionOfSlot[slot] as number
    this.shift(p, -1)
    this.count--
    this.stored[slot] = undefined
  }

  build(docs: Iterable<SearchDocument>): void {
    this.slotOfId.clear()
    this.freeSlots = []
    this.nextSlot = 0
    this.stored = []
    this.count = 0
    this.families.clear()
    this.regions.clear()
    this.text.clear()
    this.curves.reset()
    // Slots are handed out in displacement order, so a range scan reads the curves and records in memory order.
    const sorted = [...docs].sort((a, b) => a.displacementCi - b.displacementCi || a.id - b.id)
    for (let p = 0; p < sorted.length; p++) {
      const doc = sorted[p] as SearchDocument
      if (this.slotOfId.has(doc.id)) throw new RangeError(`document ${doc.id} appears twice`)
      const slot = this.allocateSlot()
      this.slotOfId.set(doc.id, slot)
      this.writeSlot(slot, doc)
      this.writePosition(p, slot)
    }
    this.count = sorted.length
  }

  upsert(doc: SearchDocument): void {
    let slot = this.slotOfId.get(doc.id)
    if (slot !== undefined) this.forgetSlot(slot)
    else {
      slot = this.allocateSlot()
      this.slotOfId.set(doc.id, slot)
    }
    this.writeSlot(slot, doc)
    const p = this.lowerBound(doc.displacementCi, doc.id)
    this.shift(p, 1)
    this.count++
    this.writePosition(p, slot)
  }

  remove(id: number): boolean {
    const slot = this.slotOfId.get(id)
    if (slot === undefined) return false
    this.forgetSlot(slot)
    this.slotOfId.delete(id)
    this.freeSlots.push(slot)
    return true
  }

  get(id: number): IndexedEntry | undefined {
    const slot = this.slotOfId.get(id)
    const s = slot === undefined ? undefined : this.stored[slot]
    if (slot === undefined || !s) return undefined
    return { ...s, shop: { ...s.shop }, publishedAt: new Date(s.publishedAt).toISOString(), curve: this.curves.get(slot) }
  }

  stamps(): Map<number, string> {
    const out = new Map<number, string>()
    for (const [id, slot] of this.slotOfId) out.set(id, (this.stored[slot] as Stored).stamp)
    return out
  }

  /** Mean power of a slot's curve over the band, NaN when the pull does not cover it. */
  private bandAverage(slot: number, from: number, to: number): number {
    return this.curves.average(slot, from, to)
  }

  query(params: SearchQuery): SearchResult {
    return this.run(params, -1)
  }

  matches(id: number, params: SearchQuery): boolean {
    const slot = this.slotOfId.get(id)
    if (slot === undefined) return false
    return this.run({ ...params, sort: undefined, page: 1, perPage: 1 }, this.positionOfSlot[slot] as number).total > 0
  }

  /** The query, over every row or (only ≥ 0) over that one position: the same filters either way. */
  private run(params: SearchQuery, only: number): SearchResult {
    const page = params.page ?? 1
    const perPage = params.perPage ?? 24
    const hasBand = params.bandFrom !== undefined && params.bandTo !== undefined
    const text = params.q ? this.text.match(params.q) : null
    const sort: SearchSort = params.sort ?? (text ? 'relevance' : 'newest')
    if (sort === 'target' && params.hpTarget === undefined) throw new RangeError('sort=target needs hpTarget')
    if (sort === 'band' && !hasBand) throw new RangeError('sort=band needs bandFrom and bandTo')
    const bandFrom = params.bandFrom ?? 0
    const bandTo = params.bandTo ?? 0

    const c = this.cols
    const lo = params.ciMin === undefined ? 0 : this.lowerBound(params.ciMin, -Infinity)
    const hi = params.ciMax === undefined ? this.count : this.lowerBound(params.ciMax, Infinity)
    const hpMin = params.hpMin ?? -Infinity
    const hpMax = params.hpMax ?? Infinity
    const hpFilter = params.hpMin !== undefined || params.hpMax !== undefined
    const target = params.hpTarget ?? Number.NaN
    const targetFilter = params.hpTarget !== undefined
    const tolerance = params.hpTolerance ?? DEFAULT_TARGET_TOLERANCE * target
    const tqFilter = params.tqMin !== undefined || params.tqMax !== undefined
    const tqMin = params.tqMin ?? -Infinity
    const tqMax = params.tqMax ?? Infinity
    const priceMax = params.priceMax === undefined ? Infinity : params.priceMax * 100
    const priceFilter = params.priceMax !== undefined
    const aspirationMask = maskOf(params.aspiration, ASPIRATION_CODE)
    const fuelMask = maskOf(params.fuel, FUEL_CODE)
    const useMask = maskOf(params.use, USE_CODE)
    const onlyVerified = params.verified === true
    const familyAllowed = this.allowed(params.family, this.families)
    const regionAllowed = this.allowed(params.region, this.regions)

    const aspirationCounts = new Int32Array(ASPIRATIONS.length)
    const fuelCounts = new Int32Array(FUELS.length)
    const familyCounts = new Int32Array(this.families.values.length)
    const regionCounts = new Int32Array(this.regions.values.length)
    const top = new TopK(Math.min(page * perPage, MAX_RESULT_WINDOW))
    const textIndex = this.text
    let total = 0

    // One loop over either the text matches (when fewer than the displacement range) or the range itself.
    // A single row (only ≥ 0) is read in place, when it lies inside the displacement range.
    const viaText = only < 0 && text !== null && text.count < hi - lo
    const textSlots = text?.slots
    const positionOfSlot = this.positionOfSlot
    const from = only >= 0 ? Math.max(lo, only) : viaText ? 0 : lo
    const to = only >= 0 ? Math.min(hi, only + 1) : viaText ? (text as { count: number }).count : text && text.count === 0 ? lo : hi
    const candidates = sort === 'band' ? this.candidateBuffer() : this.noCandidates
    let candidateCount = 0
    const sortCode = sort === 'relevance' ? (text ? 0 : 1) : sort === 'newest' ? 1 : sort === 'price' ? 2 : sort === 'target' ? 3 : 4
    const { hp: hps, tq: tqs, aspiration: aspirations, fuel: fuels, use: uses, verified, price, family, region, slot: slots, published, id: ids } = c
    for (let i = from; i < to; i++) {
      let p = i
      if (viaText) {
        p = positionOfSlot[(textSlots as Int32Array)[i] as number] as number
        if (p < lo || p >= hi) continue
      }
      // Each column is read only when a filter or the sort needs it: broad queries touch fewer arrays.
      if (hpFilter || targetFilter) {
        const hp = hps[p] as number
        if (hpFilter && !(hp >= hpMin && hp <= hpMax)) continue
        if (targetFilter && !(Math.abs(hp - target) <= tolerance)) continue
      }
      if (tqFilter) {
        const tq = tqs[p] as number
        if (!(tq >= tqMin && tq <= tqMax)) continue
      }
      const a = aspirations[p] as number
      const f = fuels[p] as number
      if (!((aspirationMask >> a) & 1) || !((fuelMask >> f) & 1)) continue
      if (useMask !== ALL && !((useMask >> (uses[p] as number)) & 1)) continue
      if (onlyVerified && verified[p] === 0) continue
      if (priceFilter && (price[p] as number) > priceMax) continue
      const fam = family[p] as number
      if (familyAllowed && familyAllowed[fam] !== 1) continue
      const reg = region[p] as number
      if (regionAllowed && regionAllowed[reg] !== 1) continue
      if (text && !textIndex.isMatch(slots[p] as number)) continue
      total++
      aspirationCounts[a]!++
      fuelCounts[f]!++
      familyCounts[fam]!++
      regionCounts[reg]!++
      let key: number
      if (sortCode === 0) key = -textIndex.scoreOf(slots[p] as number)
      else if (sortCode === 1) key = -(published[p] as number)
      else if (sortCode === 2) key = price[p] as number
      else if (sortCode === 3) key = Math.abs((hps[p] as number) - target)
      else {
        // Band sort: keep the candidate and rank it after the scan (see rankByBand).
        candidates[candidateCount++] = p
        continue
      }
      // Once the kept list is full, a key worse than its worst cannot get in, whatever its id.
      if (key > top.threshold) continue
      top.offer(key, ids[p] as number, slots[p] as number)
    }
    if (sortCode === 4) this.rankByBand(top, candidates, candidateCount, bandFrom, bandTo)

    const hits = top.sorted().slice((page - 1) * perPage).map((slot) => {
      const { stamp: _stamp, ...s } = this.stored[slot] as Stored
      const hit: SearchHit = { ...s, shop: { ...s.shop }, publishedAt: new Date(s.publishedAt).toISOString() }
      if (hasBand) {
        const avg = this.bandAverage(slot, bandFrom, bandTo)
        hit.bandAvgHp = Number.isNaN(avg) ? null : Math.round(avg * 10) / 10
      }
      if (text) hit.score = Math.round(textIndex.scoreOf(slot) * 1000) / 1000
      return hit
    })
    return { total, page, perPage, hits, facets: this.facets(aspirationCounts, fuelCounts, familyCounts, regionCounts) }
  }

  private candidates = new Int32Array(0)
  private readonly noCandidates = new Int32Array(0)

  private candidateBuffer(): Int32Array {
    if (this.candidates.length < this.count) this.candidates = new Int32Array(this.capacity)
    return this.candidates
  }

  /**
   * Ranks band-sort candidates without averaging every curve. A band average never exceeds the
   * build's peak, and bigger engines tend to make more power, so candidates are visited from the
   * largest displacement down; once the kept list is full, a build whose peak is below its weakest
   * average cannot get in and is skipped (0.01 hp of slack covers curves stored in single
   * precision). The result is the same as averaging them all.
   */
  private rankByBand(top: TopK, positions: Int32Array, n: number, from: number, to: number): void {
    const { hp, slot: slots, id: ids } = this.cols
    for (let i = n - 1; i >= 0; i--) {
      const p = positions[i] as number
      const threshold = top.threshold
      if (threshold !== Infinity && !((hp[p] as number) + 0.01 >= -threshold)) continue
      const slot = slots[p] as number
      const avg = this.bandAverage(slot, from, to)
      top.offer(Number.isNaN(avg) ? Infinity : -avg, ids[p] as number, slot)
    }
  }

  /** A lookup of allowed dictionary codes, or null when the filter is absent. */
  private allowed(values: readonly string[] | undefined, dictionary: Dictionary): Uint8Array | null {
    if (!values || values.length === 0) return null
    const out = new Uint8Array(Math.max(1, dictionary.values.length))
    for (const v of values) {
      const code = dictionary.find(v)
      if (code !== undefined) out[code] = 1
    }
    return out
  }

  private facets(aspiration: Int32Array, fuel: Int32Array, family: Int32Array, region: Int32Array): SearchFacets {
    const out: SearchFacets = { aspiration: {}, fuel: {}, family: {}, region: {} }
    ASPIRATIONS.forEach((a, i) => (out.aspiration[a] = aspiration[i] as number))
    FUELS.forEach((f, i) => (out.fuel[f] = fuel[i] as number))
    this.families.values.forEach((name, code) => {
      const n = family[code] ?? 0
      if (n > 0 || this.families.inUse(code)) out.family[name] = n
    })
    this.regions.values.forEach((name, code) => {
      const n = region[code] ?? 0
      if (n > 0 || this.regions.inUse(code)) out.region[name] = n
    })
    return out
  }
}

/** A new, empty embedded index. */
export function createSearchIndex(): SearchIndex {
  return new EmbeddedIndex()
}
