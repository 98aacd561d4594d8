// The pull pipeline end to end: each pull's derived figures are stored with it (pull_figures), equal what
// the engine module computes from the raw file under every standard, and every reader (the build page,
// search, the cards) shows the one headline pull's stored figure.
import { and, eq, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { CORRECTION_STANDARDS, convertCurve, correctionFactor, curveFingerprint, parsePull, peaks, resample, type CorrectionStandard, type PullPoint } from '../../shared/engine'
import { displayCurve } from '../../shared/builds/display-curve'
import { PULL_FIGURES_VERSION } from '../../shared/pulls/figures'
import { demoBuilds } from '../../scripts/lib/demo-data'
import { savePull } from '../../server/services/evidence-uploads'
import { createDraft, updateBuild } from '../../server/services/build-editor'
import type { Database } from '../../server/database/types'
import { api, baseUrl, schema, testDb } from '../support/context'
import { readTestUpload } from '../support/fixtures'
import { buildIds, COMPLETE_COMBINATION, inventedPullCsv, pullMeta, removeBuildsSince, testUploadStore, twoShops } from '../support/builds'

let ctx: Awaited<ReturnType<typeof testDb>>
let before: Set<number>
beforeAll(async () => {
  ctx = await testDb()
  before = await buildIds(ctx.db)
})
afterAll(async () => {
  await removeBuildsSince(ctx.db, before)
  await ctx.close()
})

const one = (n: number) => Math.round(n * 10) / 10
const SEEDED_SLUGS = demoBuilds().map(b => b.slug)
/** Where each standard's formula comes from (shared/engine/correction.ts carries them). */
const SOURCE: Record<CorrectionStandard, string> = {
  UNCORRECTED: 'no correction, factor 1',
  SAE_J1349_2004: 'SAE J1349 (2004), k = 1.176',
  SAE_J1349_1990: 'SAE J1349 (1990), k = 1.18',
  SAE_J607: 'SAE J607, 60 °F and 29.92 inHg dry',
  DIN_70020: 'DIN 70020, 20 °C and 1013 mbar',
  ISO_1585: 'ISO 1585 / ECE R85',
}

/** The seeded pulls (every pull of a seeded build whose file the demo seed stored), with their raw files and stored figures. */
async function seededPulls() {
  const rows = await ctx.db.select({ pull: schema.dynoPulls, key: schema.files.storageKey, figures: schema.pullFigures, slug: schema.builds.slug })
    .from(schema.dynoPulls)
    .innerJoin(schema.builds, eq(schema.builds.id, schema.dynoPulls.buildId))
    .innerJoin(schema.files, eq(schema.files.id, schema.dynoPulls.fileId))
    .leftJoin(schema.pullFigures, eq(schema.pullFigures.pullId, schema.dynoPulls.id))
    .where(inArray(schema.builds.slug, SEEDED_SLUGS))
  return rows.filter(r => r.key.startsWith('pulls/'))
}

/** What the engine module makes of a stored pull's raw file under one standard, computed here afresh. */
async function engineFigures(row: typeof schema.dynoPulls.$inferSelect, storageKey: string, standard: CorrectionStandard) {
  const text = await readTestUpload(storageKey)
  const parsed = parsePull(text!)
  if (!parsed.ok) throw new Error(`the stored file of pull ${row.id} does not parse`)
  const weather = row.baroInHg === null ? null : { baroInHg: row.baroInHg, airTempF: row.airTempF!, humidityPct: row.humidityPct! }
  const declared = row.declaredStandard as CorrectionStandard
  const converted = convertCurve(parsed.points, { standard: declared, weather }, { standard, weather })
  return { points: parsed.points, weather, declared, converted, peaks: peaks(converted.points) }
}

function expectCurveClose(stored: { rpm: number, hp: number, lbFt: number }[], ratio: number, expected: PullPoint[]) {
  expect(stored.map(p => p.rpm)).toEqual(expected.map(p => p.rpm))
  stored.forEach((p, i) => {
    expect(Math.abs(p.hp * ratio - expected[i]!.hp)).toBeLessThan(1e-6)
  })
}

describe('stored pull figures', () => {
  it('the demo seed stores figures of the current version for every seeded pull', async () => {
    const rows = await seededPulls()
    expect(rows.length).toBeGreaterThanOrEqual(SEEDED_SLUGS.length)
    for (const r of rows) expect(r.figures?.version, `pull ${r.pull.id} of ${r.slug}`).toBe(PULL_FIGURES_VERSION)
  })

  it.each(CORRECTION_STANDARDS.map(s => [s.id, SOURCE[s.id]] as const))(
    'equal what the engine module computes from the raw file under %s (%s), for every seeded pull', async (standard) => {
      const rows = await seededPulls()
      for (const { pull, key, figures } of rows) {
        const stored = figures!.standards[standard]
        const engine = await engineFigures(pull, key, standard)
        const label = `pull ${pull.id} under ${standard}`
        expect({ peakHp: stored.peakHp, peakHpRpm: stored.peakHpRpm, peakTq: stored.peakTq, peakTqRpm: stored.peakTqRpm, uncorrected: stored.uncorrected }, label).toEqual({
          peakHp: one(engine.peaks.peakHp), peakHpRpm: engine.peaks.peakHpRpm, peakTq: one(engine.peaks.peakTq), peakTqRpm: engine.peaks.peakTqRpm, uncorrected: engine.converted.uncorrected,
        })
        // One factor per standard for the whole pull: the standard's factor over the declared standard's, for the pull's one weather reading.
        const factor = (s: CorrectionStandard) => (s === 'UNCORRECTED' || !engine.weather ? 1 : correctionFactor(s, engine.weather))
        expect(stored.ratio, label).toBeCloseTo(factor(standard) / factor(engine.declared), 12)
        // The stored display curve converted by that factor is the engine's converted curve, point for point.
        expectCurveClose(figures!.curve, stored.ratio, displayCurve(engine.converted.points))
      }
    })

  it('keep the fingerprint, the search grid and the headline summary of every seeded pull equal to the engine\'s', async () => {
    for (const { pull, key, figures } of await seededPulls()) {
      const engine = await engineFigures(pull, key, 'SAE_J1349_2004')
      expect(pull.fingerprint, `pull ${pull.id}`).toBe(curveFingerprint(engine.points))
      const grid = resample(engine.converted.points, 100)
      expect(figures!.searchCurve).toEqual({ startRpm: grid[0]!.rpm, hp: grid.map(p => one(p.hp)) })
      expect(pull.summary.peakHp).toBe(figures!.standards.SAE_J1349_2004.peakHp)
      expect(pull.summary.peakTq).toBe(figures!.standards.SAE_J1349_2004.peakTq)
    }
  })

  it('are written with the pull when it is saved', async () => {
    const db = ctx.db as unknown as Database
    const shopRows = await twoShops(ctx.db)
    const id = await createDraft(db, shopRows.mine, 'Pipeline save')
    await updateBuild(db, shopRows.mine, id, { ...COMPLETE_COMBINATION })
    const saved = await savePull(db, testUploadStore(), shopRows.mine, id, { pull: { bytes: Buffer.from(inventedPullCsv(733, 610)), name: 'pull.csv' }, meta: pullMeta({ label: 'Saved pull' }) })
    const [row] = await ctx.db.select().from(schema.pullFigures).where(eq(schema.pullFigures.pullId, saved.pullId))
    expect(row!.version).toBe(PULL_FIGURES_VERSION)
    expect(row!.standards.SAE_J1349_2004.peakHp).toBe(saved.summary.peakHp)
    expect(row!.standards.SAE_J1349_2004.peakHpRpm).toBe(saved.summary.peakHpRpm)
  })

  it('are derived from the raw file on first read when a pull has none, or has them from an older version', async () => {
    const [source] = await seededPulls()
    const [copy] = await ctx.db.insert(schema.dynoPulls).values({ ...source!.pull, id: undefined, createdAt: undefined, updatedAt: undefined, status: 'submitted', comparisonRole: null, changeKind: null, changeNote: null, label: 'Pipeline lazy pull' }).$returningId()
    try {
      expect(await ctx.db.select().from(schema.pullFigures).where(eq(schema.pullFigures.pullId, copy!.id))).toHaveLength(0)
      // Any Auth.js cookie skips the public answer cache (server/utils/public-cache.ts): this insert went round the build-changed hook.
      const fresh = { headers: { cookie: 'authjs.callback-url=%2F' } }
      const first = await api(`/api/builds/${source!.slug}/curves`, fresh)
      expect(first.status).toBe(200)
      const [made] = await ctx.db.select().from(schema.pullFigures).where(eq(schema.pullFigures.pullId, copy!.id))
      expect(made!.version).toBe(PULL_FIGURES_VERSION)
      expect(made!.standards).toEqual(source!.figures!.standards)

      // An older version's row (here with a wrong figure) is recomputed on the next read.
      const wrong = { ...made!.standards, SAE_J1349_2004: { ...made!.standards.SAE_J1349_2004, peakHp: 1 } }
      await ctx.db.update(schema.pullFigures).set({ version: PULL_FIGURES_VERSION - 1, standards: wrong }).where(eq(schema.pullFigures.pullId, copy!.id))
      const again = await api(`/api/builds/${source!.slug}/curves`, fresh)
      expect(again.body.pulls.find((p: { id: number }) => p.id === copy!.id).peaks.peakHp).toBe(source!.figures!.standards.SAE_J1349_2004.peakHp)
      const [redone] = await ctx.db.select().from(schema.pullFigures).where(eq(schema.pullFigures.pullId, copy!.id))
      expect(redone!.version).toBe(PULL_FIGURES_VERSION)
      expect(redone!.standards.SAE_J1349_2004.peakHp).toBe(source!.figures!.standards.SAE_J1349_2004.peakHp)
    }
    finally {
      await ctx.db.delete(schema.dynoPulls).where(and(eq(schema.dynoPulls.id, copy!.id), eq(schema.dynoPulls.label, 'Pipeline lazy pull')))
    }
  })
})

/** A figure as the pages print it: thousands separators dropped; the dash of "no figure" is null. */
const shownNumber = (text: string): number | null => (text.trim() === '—' ? null : Number(text.trim().replaceAll(',', '')))

/** The number in the element with this data-test in server-rendered HTML. */
function figureIn(html: string, test: string): number | null {
  const m = html.match(new RegExp(`data-test="${test}"[^>]*>([^<]+)<`))
  if (!m) throw new Error(`no ${test} in the page`)
  return shownNumber(m[1]!)
}

/** The power figure of each build card in server-rendered HTML, by the build's slug. */
function cardPowers(html: string): Map<string, number | null> {
  const out = new Map<string, number | null>()
  // Each card is a link to its build (<a href="/builds/…" … data-test="build-card">) holding its power figure.
  const starts = [...html.matchAll(/<a[^>]*href="\/builds\/([^"?]+)"[^>]*data-test="build-card"/g)]
  starts.forEach((m, i) => {
    const card = html.slice(m.index, starts[i + 1]?.index ?? html.length)
    const power = card.match(/data-test="card-power"[^>]*>([^<]+)</)?.[1]
    if (power) out.set(m[1]!, shownNumber(power))
  })
  return out
}

describe('one headline figure everywhere', () => {
  it('shows the same peak power on the build page, in the search result and on the card, for every seeded build', async () => {
    const search = await api('/api/search?perPage=100')
    expect(search.status).toBe(200)
    const hits = new Map<string, { peakHp: number | null }>(search.body.hits.map((h: { slug: string, peakHp: number | null }) => [h.slug, h]))
    const shopRows = await ctx.db.select({ slug: schema.shops.slug }).from(schema.shops)
    const cards = new Map<string, number | null>()
    for (const shop of shopRows) {
      const res = await fetch(`${baseUrl()}/builders/${shop.slug}`)
      if (res.status === 200) for (const [slug, hp] of cardPowers(await res.text())) cards.set(slug, hp)
    }
    const published = await ctx.db.select({ slug: schema.builds.slug, peakHp: schema.builds.peakHp }).from(schema.builds)
      .where(and(inArray(schema.builds.slug, SEEDED_SLUGS), eq(schema.builds.status, 'published')))
    expect(published.length).toBeGreaterThan(0)
    expect(published.filter(b => b.peakHp !== null).length).toBeGreaterThan(published.length / 2)
    for (const { slug, peakHp } of published) {
      const hit = hits.get(slug)
      expect(hit, `${slug} in search`).toBeDefined()
      const page = await fetch(`${baseUrl()}/builds/${slug}`)
      expect(page.status).toBe(200)
      const pageHp = figureIn(await page.text(), 'peak-hp')
      const detail = await api(`/api/builds/${slug}`)
      // The page (one decimal), the search result and the card's own figure are one number...
      expect({ slug, page: pageHp, search: hit!.peakHp, card: detail.body.peakHp, stored: peakHp }).toEqual({ slug, page: peakHp, search: peakHp, card: peakHp, stored: peakHp })
      // ...and the rendered card (whole horsepower) shows that number rounded; a build no pull may speak for shows none anywhere.
      expect(cards.get(slug), `${slug} card`).toBe(peakHp === null ? null : Math.round(peakHp))
    }
  })
})
