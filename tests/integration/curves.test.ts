import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { createHash } from 'node:crypto'
import { and, eq, isNotNull, ne } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { averagePower, convertCurve, deltaCurve, parsePull, peaks, type CorrectionStandard } from '../../shared/engine'
import { loadConfig } from '../../scripts/lib/config'
import { makeCurve, pullCsv } from '../../scripts/lib/demo-data'
import { seededRandom } from '../../shared/random'
import { DISPLAY_MAX_POINTS } from '../../shared/builds/display-curve'
import { api, baseUrl, schema, testDb } from '../support/context'
import { makeBuildAwaitingCheck, makeSubmittedPull, testUploads } from '../support/fixtures'

let ctx: Awaited<ReturnType<typeof testDb>>
beforeAll(async () => {
  ctx = await testDb()
})
afterAll(async () => {
  await ctx.close()
})

/** The pull as the module sees it, read straight from the stored file (not through the app). */
async function storedPull(pullId: number) {
  const [row] = await ctx.db.select({ pull: schema.dynoPulls, key: schema.files.storageKey }).from(schema.dynoPulls)
    .innerJoin(schema.files, eq(schema.files.id, schema.dynoPulls.fileId)).where(eq(schema.dynoPulls.id, pullId))
  const text = readFileSync(resolve(loadConfig().dataDir, 'test-uploads', row!.key), 'utf8')
  const parsed = parsePull(text)
  if (!parsed.ok) throw new Error('stored pull does not parse')
  const weather = { baroInHg: row!.pull.baroInHg!, airTempF: row!.pull.airTempF!, humidityPct: row!.pull.humidityPct! }
  return { row: row!.pull, points: parsed.points, weather }
}

async function firstPublishedWithComparison() {
  const [row] = await ctx.db.select({ slug: schema.builds.slug, buildId: schema.builds.id }).from(schema.builds)
    .innerJoin(schema.dynoPulls, eq(schema.dynoPulls.buildId, schema.builds.id))
    .where(and(eq(schema.builds.status, 'published'), eq(schema.dynoPulls.comparisonRole, 'baseline'), isNotNull(schema.dynoPulls.baroInHg)))
    .limit(1)
  return row!
}

describe('GET /api/builds/:slug/curves', () => {
  it.each(['SAE_J1349_2004', 'SAE_J607', 'DIN_70020', 'ISO_1585', 'UNCORRECTED'] as CorrectionStandard[])(
    'recomputes every pull from its raw file under %s exactly as convertCurve does', async (standard) => {
      const { slug } = await firstPublishedWithComparison()
      const res = await api(`/api/builds/${slug}/curves?standard=${standard}`)
      expect(res.status).toBe(200)
      expect(res.body.standard).toBe(standard)
      for (const pull of res.body.pulls) {
        const stored = await storedPull(pull.id)
        const expected = convertCurve(stored.points, { standard: stored.row.declaredStandard as CorrectionStandard, weather: stored.weather }, { standard, weather: stored.weather })
        const pk = peaks(expected.points)
        expect(pull.peaks.peakHp).toBeCloseTo(pk.peakHp, 1)
        expect(pull.peaks.peakHpRpm).toBe(pk.peakHpRpm)
        expect(pull.points[3].hp).toBeCloseTo(expected.points[3]!.hp, 1)
        expect(pull.points.length).toBe(stored.points.length)
      }
    })

  it('changes the figures when the standard changes (a hot, humid day corrects differently under each)', async () => {
    const { slug } = await firstPublishedWithComparison()
    const a = await api(`/api/builds/${slug}/curves?standard=SAE_J1349_2004`)
    const b = await api(`/api/builds/${slug}/curves?standard=UNCORRECTED`)
    expect(a.body.pulls[0].peaks.peakHp).not.toBeCloseTo(b.body.pulls[0].peaks.peakHp, 0)
  })

  it('answers the baseline/variant comparison from deltaCurve with a sentence', async () => {
    const { slug } = await firstPublishedWithComparison()
    const res = await api(`/api/builds/${slug}/curves`)
    expect(res.body.comparisons.length).toBeGreaterThan(0)
    const c = res.body.comparisons[0]
    const base = await storedPull(c.baselineId)
    const variant = await storedPull(c.variantId)
    const to = { standard: 'SAE_J1349_2004' as const }
    const expected = deltaCurve(
      convertCurve(base.points, { standard: base.row.declaredStandard as CorrectionStandard, weather: base.weather }, { ...to, weather: base.weather }).points,
      convertCurve(variant.points, { standard: variant.row.declaredStandard as CorrectionStandard, weather: variant.weather }, { ...to, weather: variant.weather }).points,
    )
    expect(c.maxGainHp).toBeCloseTo(expected.summary.maxGainHp, 1)
    expect(c.points).toHaveLength(expected.points.length)
    expect(c.sentence).toMatch(/variant/)
  })

  it('refuses an unknown standard with a 400 naming the choices, and an unknown build with 404', async () => {
    const { slug } = await firstPublishedWithComparison()
    const bad = await api(`/api/builds/${slug}/curves?standard=SAE_J9999`)
    expect(bad.status).toBe(400)
    expect(bad.body.message).toContain('SAE_J1349_2004')
    expect((await api('/api/builds/no-such-build/curves')).status).toBe(404)
  })
})

describe('a dense pull on the public page', () => {
  it('sends a bounded display curve to the page, computes peaks from every point, and keeps every point in the CSV', async () => {
    const { slug, pullId } = await makeBuildAwaitingCheck(ctx.db)
    // An invented pull logged every 1 rpm: thousands of rows, far more than a chart can show.
    const dense = pullCsv(makeCurve(seededRandom(4242), { peakHpTarget: 560, redline: 7200, boosted: false, stepRpm: 1 }))
    const [row] = await ctx.db.select({ key: schema.files.storageKey }).from(schema.dynoPulls)
      .innerJoin(schema.files, eq(schema.files.id, schema.dynoPulls.fileId)).where(eq(schema.dynoPulls.id, pullId))
    await testUploads().setItemRaw(row!.key, dense)
    const full = parsePull(dense)
    if (!full.ok) throw new Error('the dense pull does not parse')
    expect(full.points.length).toBeGreaterThan(4000)

    // Asked under the standard the shop declared, the figures are the file's own.
    const [meta] = await ctx.db.select({ standard: schema.dynoPulls.declaredStandard }).from(schema.dynoPulls).where(eq(schema.dynoPulls.id, pullId))
    const res = await api(`/api/builds/${slug}/curves?standard=${meta!.standard}`)
    expect(res.status).toBe(200)
    const pull = res.body.pulls.find((p: { id: number }) => p.id === pullId)
    expect(pull.points.length).toBeLessThanOrEqual(DISPLAY_MAX_POINTS)
    expect(pull.points.length).toBeGreaterThan(DISPLAY_MAX_POINTS / 2)
    // The display grid stays inside the pull and steps by whole tens of rpm.
    expect(pull.points[0].rpm).toBeGreaterThanOrEqual(full.points[0]!.rpm)
    expect(pull.points.at(-1).rpm).toBeLessThanOrEqual(full.points.at(-1)!.rpm)
    expect(pull.points[1].rpm - pull.points[0].rpm).toBe(pull.points[2].rpm - pull.points[1].rpm)
    expect((pull.points[1].rpm - pull.points[0].rpm) % 10).toBe(0)
    // Peaks come from every point of the file, not from the thinned curve.
    const pk = peaks(full.points)
    expect(pull.peaks.peakHp).toBeCloseTo(pk.peakHp, 1)
    expect(pull.peaks.peakHpRpm).toBe(pk.peakHpRpm)
    // The whole answer stays small: a few hundred points, not the file.
    expect(JSON.stringify(res.body).length).toBeLessThan(200_000)

    const csv = await api(`/api/builds/${slug}/pulls/${pullId}/curve.csv?standard=${meta!.standard}`)
    expect(csv.status).toBe(200)
    const back = parsePull(String(csv.body).split('\n').filter(l => !l.startsWith('#')).join('\n'))
    expect(back.ok && back.points.length).toBe(full.points.length)
  })
})

describe('GET /api/builds/:slug/pulls/:id/raw', () => {
  it('serves the raw file exactly as uploaded, with the SHA-256 the page shows (RFC 9530 Repr-Digest)', async () => {
    const { slug } = await firstPublishedWithComparison()
    const curves = await api(`/api/builds/${slug}/curves`)
    const pull = curves.body.pulls[0]
    const [file] = await ctx.db.select({ sha256: schema.files.sha256 }).from(schema.dynoPulls)
      .innerJoin(schema.files, eq(schema.files.id, schema.dynoPulls.fileId)).where(eq(schema.dynoPulls.id, pull.id))
    expect(pull.sha256).toBe(file!.sha256)
    const res = await fetch(`${baseUrl()}/api/builds/${slug}/pulls/${pull.id}/raw`)
    expect(res.status).toBe(200)
    const bytes = Buffer.from(await res.arrayBuffer())
    expect(createHash('sha256').update(bytes).digest('hex')).toBe(file!.sha256)
    expect(res.headers.get('repr-digest')).toBe(`sha-256=:${Buffer.from(file!.sha256, 'hex').toString('base64')}:`)
    expect(res.headers.get('content-disposition')).toContain('attachment')
  })

  it('answers 404 for a rejected pull, a pull of another build and an unpublished build', async () => {
    const { slug, buildId } = await firstPublishedWithComparison()
    const [other] = await ctx.db.select({ id: schema.dynoPulls.id }).from(schema.dynoPulls).where(ne(schema.dynoPulls.buildId, buildId)).limit(1)
    expect((await api(`/api/builds/${slug}/pulls/${other!.id}/raw`)).status).toBe(404)
    const rejected = await makeSubmittedPull(ctx.db, slug)
    expect((await api(`/api/builds/${slug}/pulls/${rejected.pullId}/raw`)).status).toBe(200)
    await ctx.db.update(schema.dynoPulls).set({ status: 'rejected' }).where(eq(schema.dynoPulls.id, rejected.pullId))
    expect((await api(`/api/builds/${slug}/pulls/${rejected.pullId}/raw`)).status).toBe(404)
    expect((await api(`/api/builds/no-such-build/pulls/1/raw`)).status).toBe(404)
  })
})

describe('GET /api/builds/:slug/pulls/:id/curve.csv', () => {
  it('downloads the pull under the chosen standard as CSV that parses back', async () => {
    const { slug } = await firstPublishedWithComparison()
    const curves = await api(`/api/builds/${slug}/curves?standard=DIN_70020`)
    const pull = curves.body.pulls[0]
    const res = await api(`/api/builds/${slug}/pulls/${pull.id}/curve.csv?standard=DIN_70020`)
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toContain('text/csv')
    const parsed = parsePull(String(res.body).split('\n').filter(l => !l.startsWith('#')).join('\n'))
    expect(parsed.ok).toBe(true)
    if (parsed.ok) expect(peaks(parsed.points).peakHp).toBeCloseTo(pull.peaks.peakHp, 0)
  })

  it('answers 404 for a pull of another build and 400 for a malformed id', async () => {
    const { slug, buildId } = await firstPublishedWithComparison()
    const [other] = await ctx.db.select({ id: schema.dynoPulls.id, buildId: schema.dynoPulls.buildId }).from(schema.dynoPulls)
    const foreign = other!.buildId === buildId ? other!.id + 1000 : other!.id
    expect((await api(`/api/builds/${slug}/pulls/${foreign}/curve.csv`)).status).toBe(404)
    expect((await api(`/api/builds/${slug}/pulls/abc/curve.csv`)).status).toBe(400)
  })
})

describe('GET /api/compare', () => {
  it('overlays two builds under one standard', async () => {
    // Two seeded builds with a pull: the newest-first list may start with other files' fixture builds.
    const rows = await ctx.db.selectDistinct({ id: schema.builds.id, slug: schema.builds.slug }).from(schema.builds)
      .innerJoin(schema.dynoPulls, eq(schema.dynoPulls.buildId, schema.builds.id))
      .where(eq(schema.builds.status, 'published')).orderBy(schema.builds.id).limit(2)
    const slugs = rows.map(r => r.slug)
    expect(slugs).toHaveLength(2)
    const res = await api(`/api/compare?builds=${slugs.join(',')}&standard=SAE_J607`)
    expect(res.status).toBe(200)
    expect(res.body.builds.map((b: { build: { slug: string } }) => b.build.slug)).toEqual(slugs)
    for (const b of res.body.builds) expect(b.pull.standard).toBe('SAE_J607')
  })

  it('gives each build its headline pull, price, combination and average power across the racer\'s band', async () => {
    const rows = await ctx.db.selectDistinct({ id: schema.builds.id, slug: schema.builds.slug }).from(schema.builds)
      .innerJoin(schema.dynoPulls, eq(schema.dynoPulls.buildId, schema.builds.id))
      .where(eq(schema.builds.status, 'published')).orderBy(schema.builds.id).limit(2)
    const slugs = rows.map(r => r.slug)
    const res = await api(`/api/compare?builds=${slugs.join(',')}&bandFrom=4000&bandTo=6000`)
    expect(res.status).toBe(200)
    expect(res.body.band).toEqual({ from: 4000, to: 6000 })
    for (const row of res.body.builds) {
      const curves = await api(`/api/builds/${row.build.slug}/curves`)
      expect(row.pull.id).toBe(curves.body.headlineId)
      expect(typeof row.build.priceCents).toBe('number')
      expect(typeof row.build.boreIn).toBe('number')
      expect(typeof row.build.cylinderHeads).toBe('string')
      // The band average is the engine module's trapezoid average over the same curve (shared/engine averagePower).
      const expected = averagePower(row.pull.points, 4000, 6000)
      expect(row.bandAvgHp).toBeCloseTo(expected, 1)
    }
    const onePull = await api(`/api/compare?builds=${slugs[0]}&bandFrom=1000&bandTo=12000`)
    expect(onePull.body.builds[0].bandAvgHp).toBeNull()
  })

  it.each([
    ['builds=a&bandFrom=4000', 'needs both'],
    ['builds=a&bandFrom=5000&bandTo=5050', 'at least 100 rpm'],
    ['builds=a&bandFrom=300&bandTo=5000', 'between 1,000 and 12,000'],
  ])('refuses a bad band %s with a 400', async (query, words) => {
    const res = await api(`/api/compare?${query}`)
    expect(res.status).toBe(400)
    expect(res.body.message).toContain(words)
  })

  it.each([
    ['builds=', 'at least one'],
    ['builds=a,b,c,d,e', 'at most four'],
    ['builds=Bad_Slug', 'slug'],
  ])('refuses %s with a 400', async (query, words) => {
    const res = await api(`/api/compare?${query}`)
    expect(res.status).toBe(400)
    expect(res.body.message).toContain(words)
  })

  it('answers 404 naming a build that does not exist', async () => {
    const res = await api('/api/compare?builds=not-a-real-build')
    expect(res.status).toBe(404)
    expect(res.body.message).toContain('not-a-real-build')
  })
})

describe('shop figures', () => {
  it('counts only checked builds and takes the median of hp per ci', async () => {
    const [shop] = await ctx.db.select().from(schema.shops).limit(1)
    const rows = await ctx.db.select().from(schema.builds).where(and(eq(schema.builds.shopId, shop!.id), eq(schema.builds.status, 'published'), isNotNull(schema.builds.verifiedAt)))
    const res = await api(`/api/builders/${shop!.slug}`)
    expect(res.body.figures.verifiedBuilds).toBe(rows.length)
    const perCi = rows.map(r => r.peakHp! / ((Math.PI / 4) * r.boreIn! ** 2 * r.strokeIn! * r.cylinders!)).sort((a, b) => a - b)
    const m = Math.floor(perCi.length / 2)
    const median = perCi.length % 2 ? perCi[m]! : (perCi[m - 1]! + perCi[m]!) / 2
    expect(res.body.figures.medianHpPerCi).toBeCloseTo(median, 6)
    expect(res.body.figures.maxPeakHp).toBe(Math.max(...rows.map(r => r.peakHp!)))
  })
})
