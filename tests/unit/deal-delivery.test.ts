import { describe, expect, it } from 'vitest'
import { curveFingerprint } from '../../shared/engine/fingerprint'
import { evaluateDelivery, minimumPower, type DeliveryInput } from '../../shared/deals/delivery'
import { blockingMilestone, SETTLED_MILESTONE_STATES } from '../../shared/deals/constants'
import { DISPLAY_MAX_POINTS } from '../../shared/builds/display-curve'
import { inventedPull } from './engine/helpers'

// An invented delivery: 4.125 × 4.000 in, eight cylinders (427.6 ci), torque peaking at 560 lb·ft.
const points = inventedPull({ fromRpm: 3000, toRpm: 7000, stepRpm: 50, peakTq: 560, peakTqRpm: 5000, droop: 0.000015 })
const weather = { baroInHg: 29.4, airTempF: 81, humidityPct: 40 }
const base: DeliveryInput = {
  points, declaredStandard: 'SAE_J1349_2004', weather, boreIn: 4.125, strokeIn: 4.0, cylinders: 8, aspiration: 'na',
  displacementCapCi: 430, guarantee: { hp: 600, tolerancePct: 2, standard: 'SAE_J1349_2004' },
}
const filePeak = Math.max(...points.map(p => p.hp))

describe('evaluateDelivery', () => {
  it('verifies a clean pull and compares its peak with the target less the tolerance', () => {
    const report = evaluateDelivery(base)
    expect(report.status).toBe('verified')
    expect(report.reasons).toEqual([])
    expect(report.displacementCi).toBeCloseTo(427.6, 1)
    expect(report.peakHp).toBeCloseTo(filePeak, 0)
    expect(report.minimumHp).toBe(588)
    expect(report.meetsTarget).toBe(filePeak >= 588)
    expect(report.meetsTarget).toBe(true)
  })

  it('misses the target when the peak is under it by more than the tolerance', () => {
    const report = evaluateDelivery({ ...base, guarantee: { hp: Math.ceil(filePeak * 1.03), tolerancePct: 2, standard: 'SAE_J1349_2004' } })
    expect(report.status).toBe('verified')
    expect(report.meetsTarget).toBe(false)
  })

  it('puts the curve under the quoted standard: J1349 figures re-expressed under DIN 70020 by the ratio of the two factors', () => {
    // Both factors written out here from the standards' formulas (recalled from memory, not read from the documents):
    // DIN 70020: cf = (1013 / p) × √((273 + t) / 293), p total in mbar, t in °C.
    // SAE J1349 (2004): cf = 1.176 × (99 / Pd) × √((t + 273) / 298) − 0.176, Pd dry-air kPa;
    // vapour pressure by the Buck (1981) equation over water, es = 0.61121 exp((18.678 − t/234.5) · t / (257.14 + t)) kPa.
    const tC = (weather.airTempF - 32) * 5 / 9
    const totalKpa = weather.baroInHg * 3.386389
    const dryKpa = totalKpa - (weather.humidityPct / 100) * 0.61121 * Math.exp((18.678 - tC / 234.5) * (tC / (257.14 + tC)))
    const din = (1013 / (totalKpa * 10)) * Math.sqrt((273 + tC) / 293)
    const sae = 1.176 * (99 / dryKpa) * Math.sqrt((tC + 273) / 298) - 0.176
    const j1349 = evaluateDelivery(base)
    const underDin = evaluateDelivery({ ...base, guarantee: { hp: 600, tolerancePct: 2, standard: 'DIN_70020' } })
    expect(underDin.standard).toBe('DIN_70020')
    expect(underDin.peakHp / j1349.peakHp).toBeCloseTo(din / sae, 3)
  })

  it('rejects an engine over the request\'s displacement cap, saying by how much', () => {
    const report = evaluateDelivery({ ...base, displacementCapCi: 420 })
    expect(report.status).toBe('rejected')
    expect(report.meetsTarget).toBe(false)
    expect(report.reasons.join(' ')).toContain('427.6 ci, over the 420 ci cap')
  })

  it('rejects a curve that is already attached to a listed build', () => {
    const report = evaluateDelivery({ ...base, fingerprintsOfOtherBuilds: [{ buildId: 17, fingerprint: curveFingerprint(points) }] })
    expect(report.status).toBe('rejected')
    expect(report.checks.find(c => c.id === 'duplicate-curve')?.outcome).toBe('fail')
  })

  it('rejects a pull whose weather lies outside what the standard allows (a warning on a build, a refusal here)', () => {
    const report = evaluateDelivery({ ...base, weather: { baroInHg: 24.0, airTempF: 81, humidityPct: 40 } })
    expect(report.checks.find(c => c.id === 'correction-factor')?.outcome).toBe('warn')
    expect(report.status).toBe('rejected')
    expect(report.reasons.join(' ')).toContain('Outside what the standard allows')
  })

  it('needs no target when the milestone carries no guarantee', () => {
    const report = evaluateDelivery({ ...base, guarantee: null })
    expect(report.minimumHp).toBeNull()
    expect(report.meetsTarget).toBe(true)
  })
})

describe('minimumPower', () => {
  it('is the target less its tolerance', () => {
    expect(minimumPower({ hp: 720, tolerancePct: 2, standard: 'SAE_J1349_2004' })).toBeCloseTo(705.6, 9)
    expect(minimumPower({ hp: 500, tolerancePct: 0, standard: 'DIN_70020' })).toBe(500)
  })
})

describe('milestones are done in order', () => {
  const m = (position: number, state: string, title = `M${position}`) => ({ position, state, title })
  it('blocks a milestone while an earlier one is unpaid, held, submitted or disputed', () => {
    for (const state of ['awaiting_payment', 'funded', 'submitted', 'disputed']) {
      expect(blockingMilestone([m(1, state), m(2, 'funded'), m(3, 'funded')], 3)?.title).toBe('M1')
    }
  })
  it('lets it through once every earlier one is approved, released, refunded or cancelled', () => {
    for (const state of SETTLED_MILESTONE_STATES) expect(blockingMilestone([m(1, state), m(2, 'released'), m(3, 'funded')], 3)).toBeNull()
    expect(blockingMilestone([m(1, 'funded')], 1)).toBeNull()
  })
})

describe('the delivery pull on the order page', () => {
  it('carries its curve under the quoted standard, bounded for the chart, whose peak is the report\'s', () => {
    const report = evaluateDelivery(base)
    expect(report.curve.length).toBeGreaterThan(10)
    expect(report.curve.length).toBeLessThanOrEqual(DISPLAY_MAX_POINTS)
    let top = report.curve[0]!
    for (const p of report.curve) if (p.hp > top.hp) top = p
    expect(top.hp).toBeCloseTo(report.peakHp, 0)
    // hp = lb·ft × rpm / 5252.113 (33,000 ft·lbf/min per hp ÷ 2π, NIST SP 811), to the stored tenth.
    for (const p of report.curve) expect(p.hp).toBeCloseTo((p.lbFt * p.rpm) / 5252.113, 0)
  })
})
