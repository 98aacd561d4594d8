import { describe, expect, it } from 'vitest'
import {
  BMEP_BOUNDS_KPA, PISTON_SPEED_BOUNDS_FT_MIN, checkEvidence, correctionFactor, curveFingerprint, evidenceOutcome, parsePull, peaks, resample,
} from '../../../shared/engine'
import type { EvidenceCheck, EvidenceCheckId, EvidenceContext, EvidencePull, PullPoint, Weather } from '../../../shared/engine'
import { inventedPull, math, toCsv } from './helpers'

const IDS: EvidenceCheckId[] = ['rpm-order', 'rpm-spacing', 'power-torque-agreement', 'declared-peaks', 'correction-factor', 'bmep', 'piston-speed', 'duplicate-curve']
const weather: Weather = { baroInHg: 29.21, airTempF: 79, humidityPct: 38 }
const points = inventedPull({ fromRpm: 3000, toRpm: 7000, stepRpm: 25 }) // invented 350 ci NA curve, 450 lb·ft peak
const found = peaks(points)
const context: EvidenceContext = { aspiration: 'na', displacementCi: 350, strokeIn: 3.48 }

function pullWith(over: Partial<EvidencePull> = {}, declared: Partial<EvidencePull['declared']> = {}): EvidencePull {
  return {
    points,
    weather,
    declared: {
      standard: 'SAE_J1349_2004',
      correctionFactor: correctionFactor('SAE_J1349_2004', weather),
      peakHp: found.peakHp, peakHpRpm: found.peakHpRpm, peakTq: found.peakTq, peakTqRpm: found.peakTqRpm,
      ...declared,
    },
    ...over,
  }
}
const byId = (checks: EvidenceCheck[], id: EvidenceCheckId): EvidenceCheck => checks.find(c => c.id === id)!

describe('checkEvidence', () => {
  it('gives every check once, in a stable order, and a clean invented pull passes them all', () => {
    const checks = checkEvidence(pullWith(), context)
    expect(checks.map(c => c.id)).toEqual(IDS)
    for (const c of checks) {
      expect(c.outcome, `${c.id}: ${c.message}`).toBe('pass')
      expect(c.message.length).toBeGreaterThan(10)
      for (const v of Object.values(c.figures)) expect(Number.isFinite(v)).toBe(true)
    }
    expect(evidenceOutcome(checks)).toBe('pass')
  })

  it('works straight from a parsed file, with its columns', () => {
    const parsed = parsePull(toCsv(points))
    if (!parsed.ok) throw new Error('parse failed')
    const checks = checkEvidence({ ...pullWith(), points: parsed.points, columns: parsed.columns }, context)
    expect(evidenceOutcome(checks)).toBe('pass')
  })

  it('rpm-order fails when rpm goes backwards, and says where', () => {
    const bad = points.map(p => ({ ...p }))
    bad[40]!.rpm = bad[38]!.rpm
    const c = byId(checkEvidence(pullWith({ points: bad }), context), 'rpm-order')
    expect(c.outcome).toBe('fail')
    expect(c.figures.firstBadPoint).toBe(41)
    expect(byId(checkEvidence(pullWith({ points: bad }), context), 'duplicate-curve').outcome).toBe('warn')
  })

  it('rpm-spacing warns on an uneven file and fails on a large gap', () => {
    const uneven = points.filter((_, i) => i % 7 !== 3)
    expect(byId(checkEvidence(pullWith({ points: uneven }), context), 'rpm-spacing').outcome).toBe('warn')
    const gap = points.filter(p => p.rpm < 4500 || p.rpm > 4700)
    const c = byId(checkEvidence(pullWith({ points: gap }), context), 'rpm-spacing')
    expect(c.outcome).toBe('fail')
    expect(c.figures.largestGapRpm).toBe(250)
  })

  it('power-torque-agreement fails when power is not torque × rpm / 5252 and hints at kW labelled as hp', () => {
    const kwAsHp = points.map(p => ({ ...p, hp: math.unit(p.hp, 'hp').toNumber('kW') }))
    const c = byId(checkEvidence(pullWith({ points: kwAsHp }), context), 'power-torque-agreement')
    expect(c.outcome).toBe('fail')
    expect(c.message).toMatch(/metric/)
  })

  it('power-torque-agreement passes within 1 %, warns on a few rows a little off, and skips torque-only files', () => {
    const nudged = points.map((p, i) => ({ ...p, hp: p.hp * (i === 30 ? 1.015 : 1.004) }))
    expect(byId(checkEvidence(pullWith({ points: nudged }), context), 'power-torque-agreement').outcome).toBe('warn')
    const torqueOnly = checkEvidence(pullWith({ columns: { torque: { header: 'TQ', index: 1, unit: 'lbft' }, power: null } }), context)
    expect(byId(torqueOnly, 'power-torque-agreement').figures.comparedPoints).toBe(0)
  })

  it('declared-peaks warns at 2 % off and fails at 5 % off or at an rpm where the curve is well below its peak', () => {
    expect(byId(checkEvidence(pullWith({}, { peakHp: found.peakHp * 1.02 }), context), 'declared-peaks').outcome).toBe('warn')
    expect(byId(checkEvidence(pullWith({}, { peakHp: found.peakHp * 1.05 }), context), 'declared-peaks').outcome).toBe('fail')
    expect(byId(checkEvidence(pullWith({}, { peakTqRpm: 3200 }), context), 'declared-peaks').outcome).toBe('fail')
    // On a flat top a declared rpm 100 rpm away is still within 0.5 % of the peak: not a fault.
    expect(byId(checkEvidence(pullWith({}, { peakTqRpm: 4900 }), context), 'declared-peaks').outcome).toBe('pass')
  })

  it('correction-factor fails a factor that does not follow the weather and names the standard it matches instead', () => {
    const j607 = correctionFactor('SAE_J607', weather)
    const c = byId(checkEvidence(pullWith({}, { correctionFactor: j607 }), context), 'correction-factor')
    expect(c.outcome).toBe('fail')
    expect(c.message).toMatch(/SAE J607/)
  })

  it('correction-factor warns without weather, and fails an uncorrected pull that carries a factor', () => {
    expect(byId(checkEvidence(pullWith({ weather: null }), context), 'correction-factor').outcome).toBe('warn')
    expect(byId(checkEvidence(pullWith({}, { standard: 'UNCORRECTED', correctionFactor: 1.04 }), context), 'correction-factor').outcome).toBe('fail')
  })

  it('correction-factor warns when the weather lies outside the standard\'s range (47 °C for SAE J1349, past the 318.2 K of EU Regulation 134/2014, Annex I, App. 2.2)', () => {
    const hot: Weather = { baroInHg: 29.6, airTempF: 116.6, humidityPct: 20 }
    const c = byId(checkEvidence(pullWith({ weather: hot }, { correctionFactor: correctionFactor('SAE_J1349_2004', hot) }), context), 'correction-factor')
    expect(c.outcome).toBe('warn')
    expect(c.message).toMatch(/temperature/)
  })

  it('correction-factor fails on impossible weather rather than throwing', () => {
    const c = byId(checkEvidence(pullWith({ weather: { baroInHg: 29.9, airTempF: 70, humidityPct: 140 } }), context), 'correction-factor')
    expect(c.outcome).toBe('fail')
    expect(c.message).toMatch(/humidity/)
  })

  it('bmep: 450 lb·ft from 350 ci (≈ 194 psi by BMEP = 150.8 T / ci, handbook relation) is plausible NA', () => {
    const c = byId(checkEvidence(pullWith(), context), 'bmep')
    expect(c.outcome).toBe('pass')
    expect(Math.abs(c.figures.bmepPsi! - (150.8 * 450) / 350)).toBeLessThan(0.1)
  })

  it('bmep: 800 lb·ft from 350 ci fails for NA but passes turbocharged (bounds from memory of Heywood 1988 §2.7 and racing figures)', () => {
    const strong = inventedPull({ fromRpm: 3000, toRpm: 7000, stepRpm: 25, peakTq: 800 })
    const big = pullWith({ points: strong }, { peakHp: null, peakHpRpm: null, peakTq: null, peakTqRpm: null })
    expect(byId(checkEvidence(big, context), 'bmep').outcome).toBe('fail')
    expect(byId(checkEvidence(big, { ...context, aspiration: 'turbo' }), 'bmep').outcome).toBe('pass')
    expect(BMEP_BOUNDS_KPA.na.warn).toBeLessThan(BMEP_BOUNDS_KPA.turbo.warn)
  })

  it('piston-speed: warns at 6,750 ft/min and fails at 7,500 ft/min (2 × stroke × rpm, Heywood §2.2; thresholds our own)', () => {
    const rev = (toRpm: number): PullPoint[] => inventedPull({ fromRpm: 4000, toRpm, stepRpm: 25, peakTqRpm: 6500, droop: 0.000005 })
    const warn = byId(checkEvidence(pullWith({ points: rev(9000) }, { peakHp: null, peakHpRpm: null, peakTq: null, peakTqRpm: null }), { ...context, strokeIn: 4.5 }), 'piston-speed')
    expect(warn.outcome).toBe('warn')
    expect(warn.figures.meanPistonSpeedFtMin).toBeCloseTo((2 * 4.5 * 9000) / 12, 6)
    const fail = byId(checkEvidence(pullWith({ points: rev(10000) }), { ...context, strokeIn: 4.5 }), 'piston-speed')
    expect(fail.outcome).toBe('fail')
    expect(PISTON_SPEED_BOUNDS_FT_MIN.fail).toBeGreaterThan(PISTON_SPEED_BOUNDS_FT_MIN.warn)
  })

  it('duplicate-curve fails when another build carries the same curve resampled, but not for the build\'s own curve', () => {
    const mine = curveFingerprint(resample(points, 100))
    const other = curveFingerprint(inventedPull({ peakTqRpm: 5200 }))
    const c = byId(checkEvidence(pullWith(), { ...context, fingerprintsOfOtherBuilds: [{ buildId: 'b-17', fingerprint: mine }, { buildId: 'b-3', fingerprint: other }] }), 'duplicate-curve')
    expect(c.outcome).toBe('fail')
    // One match, counted in words: the shop reads this report too, so no build's id is shown.
    expect(c.message).toMatch(/already attached to another build/)
    expect(c.message).not.toMatch(/b-17|b-3/)
    expect(c.figures.matches).toBe(1)
    const own = byId(checkEvidence(pullWith(), { ...context, buildId: 'b-17', fingerprintsOfOtherBuilds: [{ buildId: 'b-17', fingerprint: mine }] }), 'duplicate-curve')
    expect(own.outcome).toBe('pass')
  })

  it('duplicate-curve names the matching build by number in its figures, so the report can link to it', () => {
    const mine = curveFingerprint(resample(points, 100))
    const other = curveFingerprint(inventedPull({ peakTqRpm: 5200 }))
    const numeric = byId(checkEvidence(pullWith(), { ...context, buildId: 4, fingerprintsOfOtherBuilds: [{ buildId: 9, fingerprint: other }, { buildId: 17, fingerprint: mine }] }), 'duplicate-curve')
    expect(numeric.outcome).toBe('fail')
    expect(numeric.figures.closestBuildId).toBe(17)
    // A text id cannot go into the numeric figures; an unlike curve links to nothing.
    const text = byId(checkEvidence(pullWith(), { ...context, fingerprintsOfOtherBuilds: [{ buildId: 'b-17', fingerprint: mine }] }), 'duplicate-curve')
    expect(text.figures.closestBuildId).toBeUndefined()
    const unlike = byId(checkEvidence(pullWith(), { ...context, fingerprintsOfOtherBuilds: [{ buildId: 9, fingerprint: other }] }), 'duplicate-curve')
    expect(unlike.outcome).toBe('pass')
    expect(unlike.figures.closestBuildId).toBeUndefined()
  })

  it('never throws on garbage: every check still reports', () => {
    const garbage = [
      { points: null, declared: null, weather: null },
      { points: [], declared: { standard: 'NOPE' } },
      { points: [{ rpm: Number.NaN, hp: 3 }, { rpm: 2, hp: Number.POSITIVE_INFINITY }] },
      undefined,
    ]
    for (const g of garbage) {
      const checks = checkEvidence(g as never, {} as never)
      expect(checks.map(c => c.id)).toEqual(IDS)
      expect(evidenceOutcome(checks)).toBe('fail')
    }
  })
})

describe('where power and torque disagree', () => {
  const agreement = (pts: PullPoint[]) => byId(checkEvidence(pullWith({ points: pts }), context), 'power-torque-agreement')

  it('names the rpm range of an inflation that grows with rpm, and offers no unit explanation for it', () => {
    // Right to 4,500 rpm, then the power column raised steadily to +9 % at 7,000 rpm (an edited column).
    const edited = points.map(p => ({ ...p, hp: p.hp * (p.rpm <= 4500 ? 1 : 1 + 0.09 * (p.rpm - 4500) / 2500) }))
    const c = agreement(edited)
    expect(c.outcome).toBe('fail')
    // Past 1 % from 4,500 + 2,500 × 1/9 ≈ 4,778 rpm, so from the first 25 rpm sample above it.
    expect(c.message).toMatch(/from 4,800 to 7,000 rpm the power is high, up to 9\.0 % at 7,000 rpm/)
    expect(c.message).toContain('elsewhere they agree within 1.0 %')
    expect(c.message).not.toMatch(/PS|metric/)
  })

  it('offers metric horsepower only for a constant 1.4 % (745.7 W / 735.5 W, NIST SP 811)', () => {
    const psAsHp = points.map(p => ({ ...p, hp: math.unit(p.hp, 'hp').toNumber('W') / 735.49875 }))
    const c = agreement(psAsHp)
    expect(c.message).toMatch(/metric horsepower \(PS\) labelled hp/)
    expect(c.message).toContain('across the whole pull')
  })

  it('says a low stretch is low', () => {
    const dipped = points.map(p => ({ ...p, hp: p.hp * (p.rpm >= 5000 && p.rpm <= 5500 ? 0.95 : 1) }))
    expect(agreement(dipped).message).toMatch(/from 5,000 to 5,500 rpm the power is low, up to 5\.0 %/)
  })
})
