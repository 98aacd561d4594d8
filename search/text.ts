/**
 * The words of the index. MiniSearch does the text matching: its tokenizer splits the words and its
 * radix tree (SearchableMap) finds the vocabulary terms a typed word matches, exactly, as a prefix
 * (as-you-type) or within an edit distance (typos). Which documents hold a term lives here, in
 * typed arrays addressed by the same slots as the numeric columns, so a query over 100,000
 * builds never builds an object per matching document.
 */
import MiniSearch from 'minisearch'
import SearchableMap from 'minisearch/SearchableMap'

/** The text fields of a document, with a bit each in a posting's field mask. */
export const TEXT_FIELDS = ['title', 'summary', 'parts', 'heads', 'camshaft', 'intake', 'shop'] as const
export type TextField = (typeof TEXT_FIELDS)[number]
export type TextFields = Record<TextField, string | readonly string[]>

/** How much a match in each field counts towards relevance: the title and the shop's name most. */
const FIELD_BOOST: Record<TextField, number> = { title: 3, summary: 1, parts: 1, heads: 1.5, camshaft: 1.5, intake: 1.5, shop: 2 }
const BOOST_BY_MASK = new Float64Array(1 << TEXT_FIELDS.length)
for (let mask = 1; mask < BOOST_BY_MASK.length; mask++) {
  let best = 0
  TEXT_FIELDS.forEach((field, bit) => {
    if (mask & (1 << bit)) best = Math.max(best, FIELD_BOOST[field])
  })
  BOOST_BY_MASK[mask] = best
}

/** Words too common in builds to narrow anything down. */
const STOP_WORDS = new Set(['a', 'an', 'and', 'at', 'by', 'for', 'in', 'of', 'on', 'the', 'to', 'with', 'use'])
/**
 * A typed prefix expands to at most this many vocabulary terms, the most common first: fewer for
 * very short prefixes, so the first letters of a word stay cheap (common practice in as-you-type search).
 */
export function prefixCap(length: number): number {
  return length <= 2 ? 8 : length === 3 ? 16 : 64
}
/** Prefix expansion starts at this many typed characters. */
export const PREFIX_MIN_LENGTH = 2

/** Fields whose text repeats across builds (shop names, heads, intakes), so their term ids are remembered. */
const REPEATING_FIELDS = Uint8Array.from(TEXT_FIELDS, f => (f === 'shop' || f === 'heads' || f === 'intake' ? 1 : 0))
/** At most this many remembered lines. */
const LINE_CACHE_SIZE = 200_000

/** MiniSearch's own tokenizer. */
export const tokenize = MiniSearch.getDefault('tokenize') as (text: string) => string[]

/**
 * The same split as MiniSearch's tokenizer (line breaks, Unicode spaces and punctuation) for text
 * that is plain ASCII, without the cost of a Unicode-class regular expression; a unit test keeps
 * the two in agreement.
 */
const ASCII_SEPARATORS = /[\n\r !-#%-*,-/:;?@[-\]_{}]+/
// eslint-disable-next-line no-control-regex -- the test for plain ASCII text
const NOT_ASCII = /[^\x00-\x7F]/

/** The index terms of a text: MiniSearch's tokenizer, lower case, without stop words. */
export function termsOf(text: string): string[] {
  const out: string[] = []
  const lower = text.toLowerCase()
  for (const term of NOT_ASCII.test(lower) ? tokenize(lower) : lower.split(ASCII_SEPARATORS)) {
    if (term && !STOP_WORDS.has(term)) out.push(term)
  }
  return out
}

/** Allowed edits for a typed word: none below 5 characters, one up to 8, two from 9 (common practice in typo-tolerant search). */
export function maxEdits(term: string): number {
  return term.length < 5 ? 0 : term.length < 9 ? 1 : 2
}

/** Prefix expansions remembered per typed prefix, until the vocabulary grows or this many are kept. */
const PREFIX_CACHE_SIZE = 2000

/** Versions live in the top 24 bits of a posting's word, the field mask in the low 8. */
const VERSION_MASK = 0xFFFFFF

/** Which slots hold one term: slot, and (version << 8 | field mask) packed in one word. */
class Postings {
  slots = new Int32Array(2)
  meta = new Uint32Array(2)
  length = 0
  live = 0
  dead = 0

  push(slot: number, version: number, fields: number): void {
    if (this.length === this.slots.length) {
      const size = this.length * 2
      this.slots = grow(this.slots, size)
      this.meta = grow(this.meta, size)
    }
    this.slots[this.length] = slot
    this.meta[this.length] = ((version << 8) | fields) >>> 0
    this.length++
    this.live++
  }

  /** Drops the entries of removed documents once they outnumber the live ones. */
  compact(current: Uint32Array): void {
    let w = 0
    for (let r = 0; r < this.length; r++) {
      const slot = this.slots[r] as number
      const meta = this.meta[r] as number
      if (meta >>> 8 !== current[slot]) continue
      this.slots[w] = slot
      this.meta[w] = meta
      w++
    }
    this.length = w
    this.live = w
    this.dead = 0
  }
}

function grow<T extends Int32Array | Uint32Array | Uint8Array | Float64Array>(array: T, size: number): T {
  const next = new (array.constructor as new (n: number) => T)(size)
  next.set(array)
  return next
}

interface Expansion {
  term: number
  weight: number
}

/** Term postings per slot, with the scratch arrays a query scores into. */
export class TextIndex {
  private termIds = new Map<string, number>()
  private vocabulary = new SearchableMap<number>()
  private postings: Postings[] = []
  private version = new Uint32Array(0)
  // Each slot's term ids, in one append-only arena (start, count per slot; count −1 when empty).
  private arena = new Int32Array(1 << 16)
  /** The field mask of each arena entry. */
  private arenaMasks = new Uint8Array(1 << 16)
  private arenaLength = 0
  private arenaGarbage = 0
  private termStart = new Int32Array(0)
  private termCount = new Int32Array(0)
  private scratch = new Int32Array(256)
  private collected = 0
  private lineCache = new Map<string, number[]>()
  private live = 0
  // Query scratch, per slot: which query last touched it, how many of its words it matched, its score.
  private queryStamp = new Uint32Array(0)
  private matched = new Uint8Array(0)
  private score = new Float64Array(0)
  private wordStamp = new Uint32Array(0)
  private wordBest = new Float64Array(0)
  private touched = new Int32Array(0)
  private queryCounter = 0
  private wordCounter = 0
  private lastWordCount = 0
  // Indexing scratch: the field mask of each term of the document being added.
  private maskOfTerm = new Uint8Array(1024)
  private seenStamp = new Uint32Array(1024)
  private seenCounter = 0

  /** Makes room for slots [0, capacity). */
  reserve(capacity: number): void {
    if (capacity <= this.version.length) return
    const previous = this.version.length
    this.version = grow(this.version, capacity)
    this.termStart = grow(this.termStart, capacity)
    this.termCount = grow(this.termCount, capacity)
    this.termCount.fill(-1, previous)
    this.queryStamp = grow(this.queryStamp, capacity)
    this.matched = grow(this.matched, capacity)
    this.score = grow(this.score, capacity)
    this.wordStamp = grow(this.wordStamp, capacity)
    this.wordBest = grow(this.wordBest, capacity)
    this.touched = grow(this.touched, capacity)
  }

  clear(): void {
    this.termIds.clear()
    this.vocabulary.clear()
    this.lineCache.clear()
    this.prefixCache.clear()
    this.postings = []
    this.arenaLength = 0
    this.arenaGarbage = 0
    this.termCount.fill(-1)
    this.live = 0
    this.version.fill(0)
  }

  private termId(term: string): number {
    let id = this.termIds.get(term)
    if (id === undefined) {
      id = this.postings.length
      this.termIds.set(term, id)
      this.vocabulary.set(term, id)
      this.postings.push(new Postings())
      if (id >= this.maskOfTerm.length) {
        this.maskOfTerm = grow(this.maskOfTerm, id * 2)
        this.seenStamp = grow(this.seenStamp, id * 2)
      }
    }
    return id
  }

  /** Term ids of one line of text, remembered for the fields whose text repeats across builds. */
  private lineTerms(line: string, cache: boolean): number[] {
    let ids = cache ? this.lineCache.get(line) : undefined
    if (!ids) {
      const terms = termsOf(line)
      ids = new Array<number>(terms.length)
      for (let i = 0; i < terms.length; i++) ids[i] = this.termId(terms[i] as string)
      if (cache) {
        if (this.lineCache.size >= LINE_CACHE_SIZE) this.lineCache.clear()
        this.lineCache.set(line, ids)
      }
    }
    return ids
  }

  private collect(line: string, bit: number, stamp: number): void {
    if (REPEATING_FIELDS[bit] === 1) {
      const ids = this.lineTerms(line, true)
      for (let i = 0; i < ids.length; i++) this.mark(ids[i] as number, bit, stamp)
      return
    }
    // Text that does not repeat (titles, summaries, parts) goes straight from the split to the
    // document's term list, without an array of terms or of ids per line.
    const lower = line.toLowerCase()
    const terms = NOT_ASCII.test(lower) ? tokenize(lower) : lower.split(ASCII_SEPARATORS)
    for (let i = 0; i < terms.length; i++) {
      const term = terms[i] as string
      if (term && !STOP_WORDS.has(term)) this.mark(this.termId(term), bit, stamp)
    }
  }

  /** Adds a term id to the document being indexed (once), with the field it was found in. */
  private mark(id: number, bit: number, stamp: number): void {
    if (this.seenStamp[id] !== stamp) {
      this.seenStamp[id] = stamp
      this.maskOfTerm[id] = 0
      if (this.collected === this.scratch.length) this.scratch = grow(this.scratch, this.collected * 2)
      this.scratch[this.collected++] = id
    }
    this.maskOfTerm[id] = (this.maskOfTerm[id] as number) | (1 << bit)
  }

  /** Indexes a document's words at a slot (which must be empty). */
  add(slot: number, fields: TextFields): void {
    const stamp = ++this.seenCounter
    this.collected = 0
    for (let bit = 0; bit < TEXT_FIELDS.length; bit++) {
      const value = fields[TEXT_FIELDS[bit] as TextField]
      if (typeof value === 'string') this.collect(value, bit, stamp)
      else for (const line of value) this.collect(line, bit, stamp)
    }
    const n = this.collected
    const version = this.version[slot] as number
    for (let i = 0; i < n; i++) {
      const id = this.scratch[i] as number
      ;(this.postings[id] as Postings).push(slot, version, this.maskOfTerm[id] as number)
    }
    if (this.arenaLength + n > this.arena.length) this.growArena(n)
    this.arena.set(this.scratch.subarray(0, n), this.arenaLength)
    for (let i = 0; i < n; i++) this.arenaMasks[this.arenaLength + i] = this.maskOfTerm[this.scratch[i] as number] as number
    this.termStart[slot] = this.arenaLength
    this.termCount[slot] = n
    this.arenaLength += n
    this.live++
  }

  /** Makes room for n more term ids, dropping the lists of removed documents when they are most of the arena. */
  private growArena(n: number): void {
    if (this.arenaGarbage > this.arenaLength / 2) {
      const next = new Int32Array(Math.max(this.arena.length, (this.arenaLength - this.arenaGarbage + n) * 2))
      const masks = new Uint8Array(next.length)
      let w = 0
      for (let slot = 0; slot < this.termCount.length; slot++) {
        const count = this.termCount[slot] as number
        if (count < 0) continue
        const start = this.termStart[slot] as number
        next.set(this.arena.subarray(start, start + count), w)
        masks.set(this.arenaMasks.subarray(start, start + count), w)
        this.termStart[slot] = w
        w += count
      }
      this.arena = next
      this.arenaMasks = masks
      this.arenaLength = w
      this.arenaGarbage = 0
      if (w + n <= next.length) return
    }
    this.arena = grow(this.arena, Math.max(this.arena.length * 2, this.arenaLength + n))
    this.arenaMasks = grow(this.arenaMasks, this.arena.length)
  }

  /** Forgets the words at a slot: its postings become stale at once and are compacted later. */
  remove(slot: number): void {
    const count = this.termCount[slot] as number
    if (count < 0) return
    this.version[slot] = ((this.version[slot] as number) + 1) & VERSION_MASK
    const start = this.termStart[slot] as number
    for (let i = start; i < start + count; i++) {
      const p = this.postings[this.arena[i] as number] as Postings
      p.live--
      p.dead++
      if (p.dead > 32 && p.dead > p.live) p.compact(this.version)
    }
    this.termCount[slot] = -1
    this.arenaGarbage += count
    this.live--
  }

  /** The vocabulary terms one typed word stands for, each with how much a match counts. */
  private expand(word: string, asPrefix: boolean): Expansion[] {
    const found = new Map<number, number>()
    const exact = this.termIds.get(word)
    if (exact !== undefined) found.set(exact, 1)
    if (asPrefix && word.length >= PREFIX_MIN_LENGTH) {
      for (const e of this.longerTerms(word)) if (!found.has(e.term)) found.set(e.term, e.weight)
    }
    // The word still being typed is taken as a typo only when nothing starts with it.
    const edits = asPrefix && found.size > 0 ? 0 : maxEdits(word)
    if (edits > 0) {
      for (const [, [id, distance]] of this.vocabulary.fuzzyGet(word, edits)) {
        const weight = distance === 0 ? 1 : 0.45 / distance
        if ((found.get(id) ?? 0) < weight) found.set(id, weight)
      }
    }
    return [...found].map(([term, weight]) => ({ term, weight }))
  }

  private prefixCache = new Map<string, Expansion[]>()
  private prefixCacheVocabulary = 0

  /** The most common longer terms starting with a prefix (MiniSearch's radix tree), remembered per prefix. */
  private longerTerms(word: string): Expansion[] {
    if (this.prefixCacheVocabulary !== this.termIds.size || this.prefixCache.size >= PREFIX_CACHE_SIZE) {
      this.prefixCache.clear()
      this.prefixCacheVocabulary = this.termIds.size
    }
    const cached = this.prefixCache.get(word)
    if (cached) return cached
    const longer: Expansion[] = []
    for (const [term, id] of this.vocabulary.atPrefix(word).entries()) {
      if (term !== word && (this.postings[id] as Postings).live > 0) longer.push({ term: id, weight: 0.55 + 0.4 * (word.length / term.length) })
    }
    const cap = prefixCap(word.length)
    if (longer.length > cap) {
      longer.sort((a, b) => (this.postings[b.term] as Postings).live - (this.postings[a.term] as Postings).live)
      longer.length = cap
    }
    this.prefixCache.set(word, longer)
    return longer
  }

  /**
   * Scores every document that matches all the words of q (the last one also as a prefix).
   * Returns the matching slots, or null when q holds no searchable word.
   */
  match(q: string): { slots: Int32Array, count: number } | null {
    const words = [...new Set(termsOf(q))]
    if (words.length === 0) return null
    const lastTyped = termsOf(q).at(-1)
    const trailingSpace = /\s$/.test(q)
    const plan = words.map((word) => {
      const expansions = this.expand(word, word === lastTyped && !trailingSpace)
      let size = 0
      for (const e of expansions) size += (this.postings[e.term] as Postings).live
      return { expansions, size }
    }).sort((a, b) => a.size - b.size)
    const query = ++this.queryCounter
    const n = this.live
    const { version, queryStamp, matched, score, wordStamp, wordBest, touched } = this
    let count = 0
    const termsPerDocument = this.live > 0 ? (this.arenaLength - this.arenaGarbage) / this.live : 0
    for (let i = 0; i < plan.length; i++) {
      const word = ++this.wordCounter
      const step = plan[i] as { expansions: Expansion[], size: number }
      if (i > 0 && count * termsPerDocument < step.size) {
        // Few candidates left: look the word up in each candidate's own terms instead of walking postings.
        count = this.narrow(step.expansions, word, count, i)
        if (count === 0) break
        continue
      }
      count = 0
      for (const { term, weight } of step.expansions) {
        const p = this.postings[term] as Postings
        if (p.live === 0) continue
        const idf = Math.log(1 + (n - p.live + 0.5) / (p.live + 0.5))
        const { slots, meta, length } = p
        for (let e = 0; e < length; e++) {
          const slot = slots[e] as number
          const m = meta[e] as number
          if (m >>> 8 !== version[slot]) continue
          if (i > 0 && (queryStamp[slot] !== query || matched[slot] !== i)) continue
          const s = weight * idf * (BOOST_BY_MASK[m & 0xFF] as number)
          if (wordStamp[slot] !== word) {
            wordStamp[slot] = word
            wordBest[slot] = s
            touched[count++] = slot
          }
          else if (s > (wordBest[slot] as number)) {
            wordBest[slot] = s
          }
        }
      }
      for (let t = 0; t < count; t++) {
        const slot = touched[t] as number
        if (i === 0) {
          queryStamp[slot] = query
          score[slot] = wordBest[slot] as number
        }
        else {
          score[slot] = (score[slot] as number) + (wordBest[slot] as number)
        }
        matched[slot] = i + 1
      }
      if (count === 0) break
    }
    this.lastWordCount = plan.length
    return { slots: this.touched, count }
  }

  private termStamp = new Uint32Array(0)
  private termWeight = new Float64Array(0)

  /** Keeps the first `count` touched slots that hold one of the expansions, adding their best match to the score. */
  private narrow(expansions: Expansion[], word: number, count: number, i: number): number {
    if (this.termStamp.length < this.postings.length) {
      this.termStamp = grow(this.termStamp, this.postings.length * 2)
      this.termWeight = grow(this.termWeight, this.postings.length * 2)
    }
    const n = this.live
    for (const { term, weight } of expansions) {
      const live = (this.postings[term] as Postings).live
      this.termStamp[term] = word
      this.termWeight[term] = weight * Math.log(1 + (n - live + 0.5) / (live + 0.5))
    }
    const { touched, termStart, termCount, arena, arenaMasks, termStamp, termWeight, score, matched } = this
    let kept = 0
    for (let t = 0; t < count; t++) {
      const slot = touched[t] as number
      const start = termStart[slot] as number
      const end = start + (termCount[slot] as number)
      let best = 0
      for (let j = start; j < end; j++) {
        const id = arena[j] as number
        if (termStamp[id] !== word) continue
        const s = (termWeight[id] as number) * (BOOST_BY_MASK[arenaMasks[j] as number] as number)
        if (s > best) best = s
      }
      if (best > 0) {
        touched[kept++] = slot
        score[slot] = (score[slot] as number) + best
        matched[slot] = i + 1
      }
    }
    return kept
  }

  /** Whether the slot matched every word of the last query. */
  isMatch(slot: number): boolean {
    return this.queryStamp[slot] === this.queryCounter && this.matched[slot] === this.lastWordCount
  }

  /** The slot's relevance in the last query (valid when isMatch). */
  scoreOf(slot: number): number {
    return this.score[slot] as number
  }

  get vocabularySize(): number {
    return this.termIds.size
  }
}
