import { describe, expect, it } from 'vitest'
import { displacementCi } from '../../shared/engine/geometry'
import { parsePull } from '../../shared/engine/parse'
import { DEMO_RACERS, DEMO_SHOPS, demoBuilds, pullCsv } from '../../scripts/lib/demo-data'
import { demoSwapBuilds } from '../../scripts/lib/seed-swaps'
import { buildPublishSchema, combinationFields } from '../../shared/schemas/build'

describe('the invented demo scenario', () => {
  const builds = demoBuilds()

  it('has at least 8 shops, 40 builds and 5 racers', () => {
    expect(DEMO_SHOPS.length).toBeGreaterThanOrEqual(8)
    expect(builds.length).toBeGreaterThanOrEqual(40)
    expect(DEMO_RACERS.length).toBeGreaterThanOrEqual(5)
  })

  it('spans 300 to 650 ci, boosted and naturally aspirated, on several fuels', () => {
    const ci = builds.map(b => displacementCi(b.boreIn, b.strokeIn, b.cylinders))
    expect(Math.min(...ci)).toBeGreaterThanOrEqual(300)
    expect(Math.max(...ci)).toBeLessThanOrEqual(650)
    expect(new Set(builds.map(b => b.aspiration)).size).toBeGreaterThanOrEqual(3)
    expect(new Set(builds.map(b => b.fuel)).size).toBeGreaterThanOrEqual(3)
    expect(new Set(builds.map(b => b.engineFamily)).size).toBeGreaterThanOrEqual(4)
  })

  it('prices every build at exactly its parts and labor, in whole hundreds of dollars', () => {
    for (const b of builds) {
      const partsCents = b.parts.reduce((sum, p) => sum + p.quantity * p.unitPriceCents, 0)
      expect(partsCents, b.slug).toBe(b.priceCents)
      expect(b.priceCents % 10_000).toBe(0)
      // The margin sits in the labor line, never below the shop's cost (common practice: a shop does not sell below cost).
      expect(b.parts.find(p => p.category === 'Labor')!.unitPriceCents).toBeGreaterThan(0)
    }
  })

  it('gives every build, the swap comparisons too, each combination field the publish schema asks for, and passes it', () => {
    for (const b of [...builds, ...demoSwapBuilds(builds)]) {
      for (const field of Object.keys(combinationFields)) expect(b, `${b.slug} ${field}`).toHaveProperty(field)
      const checked = buildPublishSchema.safeParse(b)
      expect(checked.success, `${b.slug}: ${checked.error?.issues[0]?.message}`).toBe(true)
    }
  })

  it('names the same heads and intake in the description and in the parts list', () => {
    for (const b of builds) {
      expect(b.parts.find(p => p.category === 'Cylinder heads')?.part, b.slug).toBe(b.cylinderHeads)
      expect(b.parts.filter(p => p.category === 'Induction').map(p => p.part), b.slug).toContain(b.intakeManifold)
    }
  })

  it('is the same on every run (deterministic), with unique slugs', () => {
    expect(demoBuilds()).toEqual(builds)
    expect(new Set(builds.map(b => b.slug)).size).toBe(builds.length)
  })

  it('writes pull files that parse back to the same points', () => {
    for (const build of builds.slice(0, 10)) {
      const pull = build.pulls[0]!
      const parsed = parsePull(pullCsv(pull.points))
      expect(parsed.ok).toBe(true)
      if (parsed.ok) {
        expect(parsed.points.map(p => p.rpm)).toEqual(pull.points.map(p => p.rpm))
        expect(parsed.points[5]!.hp).toBeCloseTo(pull.points[5]!.hp, 6)
      }
    }
  })

  it('keeps power consistent with torque × rpm / 5252 on every generated point (the definition of horsepower, common practice)', () => {
    for (const build of builds) {
      for (const p of build.pulls[0]!.points) {
        expect(Math.abs(p.hp - (p.lbFt * p.rpm) / 5252)).toBeLessThan(0.06)
      }
    }
  })
})
