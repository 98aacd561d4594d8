import { and, eq } from 'drizzle-orm'
import { quantileSeq } from 'mathjs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { displacementCi } from '../../shared/engine/geometry'
import type { BuildCurves } from '../../shared/types/builds'
import type { SwapReport } from '../../server/services/swaps'
import { api, schema, testDb } from '../support/context'

let ctx: Awaited<ReturnType<typeof testDb>>
beforeAll(async () => {
  ctx = await testDb()
})
afterAll(async () => ctx.close())

interface Brute { slug: string, ci: number, peakGainHp: number, points: { rpm: number, hpDelta: number }[] }

/**
 * Brute force over the seeded comparisons: every published build, every variant pull of the kind with
 * a baseline, both verified, read back one by one through the public curve route under SAE J1349 (2004).
 */
async function bruteForce(change: string, filters: { ciMin?: number, ciMax?: number, aspiration?: string, fuel?: string } = {}): Promise<Brute[]> {
  const rows = await ctx.db.select({ build: schema.builds, pull: schema.dynoPulls }).from(schema.builds)
    .innerJoin(schema.dynoPulls, eq(schema.dynoPulls.buildId, schema.builds.id))
    .where(and(eq(schema.builds.status, 'published')))
  const out: Brute[] = []
  const slugs = [...new Set(rows.filter(r => r.pull.changeKind === change && r.pull.comparisonRole === 'variant').map(r => r.build.slug))]
  for (const slug of slugs) {
    const mine = rows.filter(r => r.build.slug === slug)
    const b = mine[0]!.build
    const ci = displacementCi(b.boreIn!, b.strokeIn!, b.cylinders!)
    if (filters.ciMin !== undefined && ci < filters.ciMin) continue
    if (filters.ciMax !== undefined && ci > filters.ciMax) continue
    if (filters.aspiration && b.aspiration !== filters.aspiration) continue
    if (filters.fuel && b.fuel !== filters.fuel) continue
    const curves = (await api(`/api/builds/${slug}/curves?standard=SAE_J1349_2004`)).body as BuildCurves
    for (const c of curves.comparisons) {
      const status = (id: number) => mine.find(r => r.pull.id === id)!.pull.status
      if (c.changeKind !== change || status(c.baselineId) !== 'verified' || status(c.variantId) !== 'verified') continue
      const peak = (id: number) => curves.pulls.find(p => p.id === id)!.peaks.peakHp
      out.push({ slug, ci, peakGainHp: peak(c.variantId) - peak(c.baselineId), points: c.points })
    }
  }
  return out
}

function lerp(points: Brute['points'], rpm: number): number | null {
  for (let i = 0; i + 1 < points.length; i++) {
    const a = points[i]!
    const b = points[i + 1]!
    if (rpm >= a.rpm && rpm <= b.rpm) return a.hpDelta + ((b.hpDelta - a.hpDelta) * (rpm - a.rpm)) / (b.rpm - a.rpm)
  }
  return null
}

/** The mean delta over the covered part of [from, to] by 1 rpm trapezoids; null below half cover. */
function meanOver(points: Brute['points'], from: number, to: number): number | null {
  const lo = Math.max(from, points[0]!.rpm)
  const hi = Math.min(to, points[points.length - 1]!.rpm)
  if (hi <= lo || hi - lo < 0.5 * (to - from)) return null
  let sum = 0
  for (let rpm = lo; rpm < hi; rpm++) sum += (lerp(points, rpm)! + lerp(points, Math.min(rpm + 1, hi))!) / 2
  return sum / (hi - lo)
}

const q = (xs: number[], p: number) => quantileSeq(xs, p) as number

function expectMatches(report: SwapReport, brute: Brute[], band: { from: number, to: number } | null) {
  expect(report.standard).toBe('SAE_J1349_2004')
  expect(report.count).toBe(brute.length)
  expect(report.comparisons.map(c => c.slug).sort()).toEqual(brute.map(b => b.slug).sort())
  const peaks = brute.map(b => b.peakGainHp)
  for (const [p, key] of [[0.25, 'q1'], [0.5, 'median'], [0.75, 'q3']] as const) expect(report.peakGain![key]).toBeCloseTo(q(peaks, p), 6)
  const bandGains = brute.map(b => meanOver(b.points, band?.from ?? b.points[0]!.rpm, band?.to ?? b.points[b.points.length - 1]!.rpm)).filter((g): g is number => g !== null)
  expect(report.bandGain!.n).toBe(bandGains.length)
  expect(report.bandGain!.median).toBeCloseTo(q(bandGains, 0.5), 3)
  expect(report.bandGain!.q1).toBeCloseTo(q(bandGains, 0.25), 3)
  expect(report.bandGain!.q3).toBeCloseTo(q(bandGains, 0.75), 3)
  expect(report.curve.length).toBeGreaterThan(3)
  for (const point of report.curve) {
    const at = brute.map(b => lerp(b.points, point.rpm)).filter((d): d is number => d !== null)
    expect(point.n).toBe(at.length)
    expect(point.median).toBeCloseTo(q(at, 0.5), 6)
    expect(point.q1).toBeCloseTo(q(at, 0.25), 6)
    expect(point.q3).toBeCloseTo(q(at, 0.75), 6)
  }
}

describe('GET /api/swaps against a brute-force computation over the seeded comparisons', () => {
  it('heads across the whole marketplace: the sample, both gain distributions and the median delta curve', async () => {
    const res = await api('/api/swaps?change=heads')
    expect(res.status).toBe(200)
    const brute = await bruteForce('heads')
    expect(brute.length).toBeGreaterThanOrEqual(10)
    expectMatches(res.body, brute, null)
  })

  it('a camshaft within a displacement range and a band: only comparisons in range, figures across the band', async () => {
    const res = await api('/api/swaps?change=camshaft&ciMin=300&ciMax=520&bandFrom=4000&bandTo=6500')
    expect(res.status).toBe(200)
    const brute = await bruteForce('camshaft', { ciMin: 300, ciMax: 520 })
    expect(brute.length).toBeGreaterThanOrEqual(5)
    expectMatches(res.body, brute, { from: 4000, to: 6500 })
    expect(res.body.curve[0].rpm).toBe(4000)
    expect(res.body.curve.at(-1).rpm).toBe(6500)
  })

  it('an intake on one aspiration and fuel counts the same comparisons as a search by hand', async () => {
    const brute = await bruteForce('intake', { aspiration: 'na' })
    const res = await api('/api/swaps?change=intake&aspiration=na')
    expect(res.body.count).toBe(brute.length)
    expect((await api('/api/swaps?change=intake&aspiration=na&fuel=methanol')).body.count).toBe((await bruteForce('intake', { aspiration: 'na', fuel: 'methanol' })).length)
  })

  it('leaves out a comparison whose pulls still wait for a check', async () => {
    const [waiting] = await ctx.db.select({ slug: schema.builds.slug, kind: schema.dynoPulls.changeKind }).from(schema.dynoPulls)
      .innerJoin(schema.builds, eq(schema.builds.id, schema.dynoPulls.buildId))
      .where(and(eq(schema.dynoPulls.comparisonRole, 'variant'), eq(schema.dynoPulls.status, 'submitted'), eq(schema.builds.status, 'published')))
    expect(waiting, 'the demo seeds one comparison still waiting for a check').toBeTruthy()
    const res = await api(`/api/swaps?change=${waiting!.kind}`)
    expect(res.body.comparisons.map((c: { slug: string }) => c.slug)).not.toContain(waiting!.slug)
  })

  it('answers bad input with a 400 that names the problem', async () => {
    const cases: [string, string][] = [
      ['', 'change is required'],
      ['change=turbo', 'change is required'],
      ['change=heads&change=intake', 'change is required'],
      ['change=heads&ciMin=500&ciMax=400', 'ciMin is above ciMax'],
      ['change=heads&ciMin=lots', 'ciMin is a number'],
      ['change=heads&bandFrom=4000', 'a band needs both'],
      ['change=heads&bandFrom=4000&bandTo=4050', 'at least 100 rpm'],
      ['change=heads&bandFrom=200&bandTo=4050', 'bandFrom is at least 1000'],
      ['change=heads&fuel=diesel', 'fuel is one of'],
      ['change=heads&colour=red', 'unknown parameter colour'],
    ]
    for (const [query, words] of cases) {
      const res = await api(`/api/swaps?${query}`)
      expect(res.status, query).toBe(400)
      expect(JSON.stringify(res.body), query).toContain(words)
    }
  })
})
