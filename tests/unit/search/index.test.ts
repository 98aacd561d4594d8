import { describe, expect, it } from 'vitest'
import { createSearchIndex, type SearchDocument, type SearchQuery } from '../../../search/index'
import { syntheticDocuments } from '../../../search/synthetic'
import { termsOf, tokenize } from '../../../search/text'
import { referenceBand, referenceFacets, referenceFilter, referenceSort, seededFilterQueries } from './reference'

const docs = syntheticDocuments(4000, { seed: 4242, shops: 60 })
const index = createSearchIndex()
index.build(docs)

const describeQuery = (q: SearchQuery) => JSON.stringify(q)

describe('filter-only queries against a brute-force filter and sort', () => {
  const queries = seededFilterQueries(docs, 160)

  it('covers a spread of result sizes, including empty ones', () => {
    const totals = queries.map(q => referenceFilter(docs, q).length)
    expect(totals.filter(t => t === 0).length).toBeGreaterThan(0)
    expect(totals.filter(t => t > 100).length).toBeGreaterThan(10)
  })

  it.each(queries.map(q => [describeQuery(q), q] as const))('agrees exactly: %s', (_name, q) => {
    const expected = referenceSort(referenceFilter(docs, q), q)
    const result = index.query(q)
    const page = q.page ?? 1
    const perPage = q.perPage ?? 24
    expect(result.total).toBe(expected.length)
    expect(result.hits.map(h => h.id)).toEqual(expected.slice((page - 1) * perPage, page * perPage).map(d => d.id))
    const facets = referenceFacets(expected)
    expect(result.facets.aspiration).toEqual(facets.aspiration)
    expect(result.facets.fuel).toEqual(facets.fuel)
    for (const [family, n] of Object.entries(result.facets.family)) expect(n).toBe(facets.family.get(family) ?? 0)
    for (const [region, n] of Object.entries(result.facets.region)) expect(n).toBe(facets.region.get(region) ?? 0)
  })

  it('answers facet counts that each add up to the total', () => {
    for (const q of queries) {
      const { total, facets } = index.query(q)
      for (const counts of [facets.aspiration, facets.fuel, facets.family, facets.region]) {
        expect(Object.values(counts).reduce((a, b) => a + b, 0)).toBe(total)
      }
    }
  })

  it('lists every family in the index among the facets, with 0 for those filtered out', () => {
    const { facets } = index.query({ aspiration: ['na'], family: [docs[0]!.family] })
    expect(Object.keys(facets.family).sort()).toEqual([...new Set(docs.map(d => d.family))].sort())
  })

  it('lists every region too, counting the builds of each among the matches', () => {
    const { facets, total } = index.query({ region: [docs[0]!.region] })
    expect(Object.keys(facets.region).sort()).toEqual([...new Set(docs.map(d => d.region))].sort())
    expect(facets.region[docs[0]!.region]).toBe(total)
    expect(total).toBe(docs.filter(d => d.region === docs[0]!.region).length)
  })

  it('treats repeated values as OR within a field and fields as AND', () => {
    const both = index.query({ aspiration: ['na', 'turbo'], perPage: 1 }).total
    const na = index.query({ aspiration: ['na'], perPage: 1 }).total
    const turbo = index.query({ aspiration: ['turbo'], perPage: 1 }).total
    expect(both).toBe(na + turbo)
    const naOnE85 = index.query({ aspiration: ['na'], fuel: ['e85'], perPage: 1 }).total
    expect(naOnE85).toBe(docs.filter(d => d.aspiration === 'na' && d.fuel === 'e85').length)
  })
})

describe('band queries', () => {
  const band = { bandFrom: 4000, bandTo: 6500 }

  it('gives each hit the average power over the band, equal to the engine module\'s trapezoid average', () => {
    const { hits } = index.query({ ...band, perPage: 100, ciMin: 300, ciMax: 450 })
    expect(hits.length).toBe(100)
    for (const hit of hits) {
      const expected = referenceBand(docs.find(d => d.id === hit.id)!, band.bandFrom, band.bandTo)
      if (expected === null) expect(hit.bandAvgHp).toBeNull()
      else expect(hit.bandAvgHp).toBeCloseTo(expected, 0)
    }
  })

  it('sorts by band power, highest first, with builds whose pull misses the band last', () => {
    const q: SearchQuery = { ...band, sort: 'band', fuel: ['e85'], perPage: 100 }
    const result = index.query(q)
    const expected = referenceSort(referenceFilter(docs, q), q)
    expect(result.total).toBe(expected.length)
    const averages = result.hits.map(h => h.bandAvgHp)
    const covered = averages.filter((a): a is number => a !== null)
    for (let i = 1; i < covered.length; i++) expect(covered[i]!).toBeLessThanOrEqual(covered[i - 1]! + 0.05)
    expect(averages.indexOf(null) === -1 || averages.slice(averages.indexOf(null)).every(a => a === null)).toBe(true)
    // The order matches the reference wherever neighbours differ by more than single-precision rounding.
    expect(result.hits[0]!.id).toBe(expected[0]!.id)
  })

  it.each([
    [{ bandFrom: 3500, bandTo: 6000, sort: 'band', perPage: 50, page: 3 }],
    [{ bandFrom: 4500, bandTo: 7500, sort: 'band', aspiration: ['turbo'], ciMin: 300, ciMax: 420, perPage: 100 }],
    [{ bandFrom: 6000, bandTo: 8500, sort: 'band', perPage: 100 }],
  ] as [SearchQuery][])('ranks every page like the reference that averages every build: %j', (q) => {
    const expected = referenceSort(referenceFilter(docs, q), q)
    const result = index.query(q)
    expect(result.total).toBe(expected.length)
    const from = ((q.page ?? 1) - 1) * (q.perPage ?? 24)
    const avg = (d: SearchDocument) => referenceBand(d, q.bandFrom!, q.bandTo!) ?? -1
    result.hits.forEach((hit, i) => {
      const want = expected[from + i]!
      if (hit.id !== want.id) expect(Math.abs(avg(docs.find(d => d.id === hit.id)!) - avg(want))).toBeLessThan(0.01)
    })
    expect(result.hits.length).toBe(Math.min(q.perPage ?? 24, Math.max(0, expected.length - from)))
  })

  it('leaves bandAvgHp null for a pull that stops short of the band', () => {
    const short = docs.find(d => d.curve && d.curve.startRpm + (d.curve.hp.length - 1) * 100 < 7000)!
    const { hits } = index.query({ bandFrom: 5000, bandTo: 7000, ciMin: short.displacementCi, ciMax: short.displacementCi })
    expect(hits.find(h => h.id === short.id)!.bandAvgHp).toBeNull()
  })
})

describe('text', () => {
  const words = (d: SearchDocument) => [d.title, d.summary, ...d.parts, d.heads, d.camshaft, d.intake, d.shop.name].join(' ').toLowerCase().split(/[\s,.:;/()]+/)

  it('finds every build holding a word, and only those', () => {
    const result = index.query({ q: 'supercharged', perPage: 100 })
    const expected = docs.filter(d => words(d).includes('supercharged'))
    expect(result.total).toBe(expected.length)
    expect(result.total).toBeGreaterThan(100)
  })

  it('needs every word (AND) and combines with filters', () => {
    const q = { q: 'supercharged methanol', ciMin: 400 }
    const expected = docs.filter(d => words(d).includes('supercharged') && words(d).includes('methanol') && d.displacementCi >= 400)
    expect(index.query(q).total).toBe(expected.length)
    expect(expected.length).toBeGreaterThan(0)
  })

  it('narrows a rare word by a common one exactly as a scan would (candidate lookup path)', () => {
    // The last word of a summary is an invented word held by a handful of builds.
    const rare = [...new Set(docs.slice(0, 15).map(d => d.summary.replace(/\.$/, '').split(', ').at(-1)!))]
    // Each word alone (typos tolerated) through the index; the two-word query must give the intersection.
    const alone = (q: string) => new Set(index.query({ q: `${q} `, perPage: 10_000 }).hits.map(h => h.id))
    const commons = ['heads', 'pushrod', 'forged'].map(word => ({ word, ids: alone(word) }))
    let checked = 0
    for (const word of rare) {
      const own = alone(word)
      expect(own.size).toBeLessThan(docs.length / 100)
      for (const common of commons) {
        const expected = [...own].filter(id => common.ids.has(id)).sort((a, b) => a - b)
        const result = index.query({ q: `${word} ${common.word} `, perPage: 100 })
        expect(result.total).toBe(expected.length)
        expect(result.hits.map(h => h.id).sort((a, b) => a - b)).toEqual(expected)
        checked += expected.length
      }
    }
    expect(checked).toBeGreaterThan(0)
  })

  it('matches the last word as a prefix while the racer types', () => {
    const typed = index.query({ q: 'supercharged metha', perPage: 1 }).total
    const full = index.query({ q: 'supercharged methanol', perPage: 1 }).total
    expect(typed).toBe(full)
    expect(index.query({ q: 'metha ', perPage: 1 }).total).toBe(0)
  })

  it('tolerates one typo in a word of five to eight letters and two in a longer one', () => {
    const exact = index.query({ q: 'methanol', perPage: 1 }).total
    expect(index.query({ q: 'methenol ', perPage: 1 }).total).toBe(exact)
    expect(index.query({ q: 'mathenol ', perPage: 1 }).total).toBe(0)
    const supercharged = index.query({ q: 'supercharged ', perPage: 1 }).total
    expect(index.query({ q: 'suparcharjed ', perPage: 1 }).total).toBe(supercharged)
    expect(index.query({ q: 'pumq ', perPage: 1 }).total).toBe(0)
    const shop = docs[7]!.shop.name.split(' ')[0]!.toLowerCase()
    const typo = shop.slice(0, 2) + (shop[2] === 'x' ? 'y' : 'x') + shop.slice(3)
    const hits = index.query({ q: `${typo} `, perPage: 100 }).hits
    expect(hits.some(h => h.shop.name === docs[7]!.shop.name)).toBe(true)
  })

  it('ranks a match in the cylinder heads above one only in the parts list or summary (field weights)', () => {
    const { hits, total } = index.query({ q: 'billet ', perPage: 100, page: 1 })
    const all = index.query({ q: 'billet ', perPage: 100, page: Math.ceil(total / 100) }).hits
    const inHeads = (id: number) => docs.find(d => d.id === id)!.heads.includes('billet')
    expect(hits.filter(h => inHeads(h.id)).length).toBeGreaterThan(0)
    expect(all.some(h => !inHeads(h.id))).toBe(true)
    const firstOther = hits.findIndex(h => !inHeads(h.id))
    if (firstOther >= 0) expect(hits.slice(firstOther).every(h => !inHeads(h.id))).toBe(true)
    expect(all.every(h => !inHeads(h.id))).toBe(true)
  })

  it('ignores a query with no searchable word and returns nothing for an unknown word', () => {
    expect(index.query({ q: '  , ' }).total).toBe(docs.length)
    expect(index.query({ q: 'qqqqzzzz ' }).total).toBe(0)
  })
})

describe('one build against a query (what a saved search runs)', () => {
  // The same queries as the scan above, plus words: a build matches exactly when the full query lists it.
  const queries: SearchQuery[] = [
    ...seededFilterQueries(docs, 40),
    { q: 'supercharged' }, { q: 'supercharged methanol', ciMin: 400 }, { q: 'pushrod', aspiration: ['na'] }, { q: 'zzyzx' },
    { verified: true, hpTarget: 700 }, { bandFrom: 4000, bandTo: 6000, hpMin: 500 },
  ]
  const sample = docs.filter((_, i) => i % 97 === 0)

  it.each(queries.map(q => [describeQuery(q), q] as const))('agrees with the full result list: %s', (_name, q) => {
    const listed = new Set(index.query({ ...q, page: 1, perPage: 10_000 }).hits.map(h => h.id))
    const matched = sample.filter(d => index.matches(d.id, q)).map(d => d.id)
    expect(matched).toEqual(sample.filter(d => listed.has(d.id)).map(d => d.id))
  })

  it('finds some builds and misses others over the sample', () => {
    const counts = queries.map(q => sample.filter(d => index.matches(d.id, q)).length)
    expect(counts.some(n => n > 0)).toBe(true)
    expect(counts.some(n => n === 0)).toBe(true)
  })

  it('is false for a build the index does not hold', () => {
    expect(index.matches(987_654_321, {})).toBe(false)
  })
})

describe('keeping in step', () => {
  it('reflects an upsert, an edit and a removal at once', () => {
    const own = createSearchIndex()
    own.build(docs.slice(0, 500))
    const doc = { ...docs[600]!, title: 'Unobtainium stroker on methanol' }
    expect(own.query({ q: 'unobtainium' }).total).toBe(0)
    own.upsert(doc)
    expect(own.size).toBe(501)
    expect(own.query({ q: 'unobtainium' }).hits.map(h => h.id)).toEqual([doc.id])
    own.upsert({ ...doc, title: 'Plain stroker', displacementCi: 999, stamp: 'edited' })
    expect(own.size).toBe(501)
    expect(own.query({ q: 'unobtainium' }).total).toBe(0)
    expect(own.query({ ciMin: 998 }).hits.map(h => h.id)).toEqual([doc.id])
    expect(own.stamps().get(doc.id)).toBe('edited')
    expect(own.remove(doc.id)).toBe(true)
    expect(own.remove(doc.id)).toBe(false)
    expect(own.query({ ciMin: 998 }).total).toBe(0)
    expect(own.size).toBe(500)
  })

  it('matches a fresh build after many edits and removals', () => {
    const own = createSearchIndex()
    own.build(docs)
    for (let i = 0; i < 1500; i++) {
      const d = docs[(i * 37) % docs.length]!
      if (i % 3 === 0) own.remove(d.id)
      else own.upsert({ ...d, priceCents: d.priceCents + i, title: `${d.title} rev ${i % 5}` })
    }
    const fresh = createSearchIndex()
    fresh.build([...own.stamps().keys()].map((id) => {
      const changed = own.get(id)!
      const original = docs.find(d => d.id === id)!
      return { ...original, priceCents: changed.priceCents, title: changed.title }
    }))
    for (const q of [{ sort: 'price' as const, perPage: 100 }, { q: 'rev supercharged', perPage: 100 }, { q: 'pushrod', ciMin: 350, perPage: 50 }]) {
      const a = own.query(q)
      const b = fresh.query(q)
      expect(a.total).toBe(b.total)
      expect(a.hits.map(h => h.id)).toEqual(b.hits.map(h => h.id))
    }
  })

  it('refuses the same id twice in one build', () => {
    expect(() => createSearchIndex().build([docs[0]!, docs[0]!])).toThrow(RangeError)
  })
})

describe('tokenizing', () => {
  it('splits plain ASCII text exactly as MiniSearch\'s tokenizer does', () => {
    const lines = [
      ...docs.slice(0, 300).flatMap(d => [d.title, d.summary, ...d.parts, d.heads, d.camshaft, d.intake, d.shop.name]),
      'a!b"c#d$e%f&g\'h(i)j*k+l,m-n.o/p:q;r<s=t>u?v@w[x\\y]z^_`{|}~end',
      'tabs\tstay\tinside, line\nbreaks\r\nsplit',
    ]
    for (const line of lines) {
      const lower = line.toLowerCase()
      expect(termsOf(line)).toEqual(tokenize(lower).filter(t => t && !['a', 'an', 'and', 'at', 'by', 'for', 'in', 'of', 'on', 'the', 'to', 'with', 'use'].includes(t)))
    }
  })

  it('falls back to MiniSearch\'s tokenizer for text beyond ASCII', () => {
    expect(termsOf('Zylinderköpfe — 23° «portiert»')).toEqual(['zylinderköpfe', '23°', 'portiert'])
  })
})
