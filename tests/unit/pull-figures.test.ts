import { describe, expect, it } from 'vitest'
import { CORRECTION_STANDARDS, convertCurve, correctionFactor, peaks, type PullPoint } from '../../shared/engine'
import { DISPLAY_MAX_POINTS } from '../../shared/builds/display-curve'
import { packCurves, unpackCurves } from '../../shared/builds/curve-payload'
import { curveUnder, declaredStandardOf, derivePullFigures, weatherOf } from '../../shared/pulls/figures'
import type { BuildCurves } from '../../shared/types/builds'
import { makeCurve } from '../../scripts/lib/demo-data'
import { seededRandom } from '../../shared/random'

/** An invented pull (the demo's parametric model), every `stepRpm` from 2,000 rpm to 7,000 rpm. */
const pull = (seed: number, stepRpm = 100): PullPoint[] => makeCurve(seededRandom(seed), { peakHpTarget: 540, redline: 7000, boosted: false, stepRpm })
const hotDay = { baroInHg: 28.6, airTempF: 95, humidityPct: 60 }

describe('derivePullFigures', () => {
  it('gives every standard its one factor for the pull: the target standard\'s over the declared one\'s, for the one weather reading', () => {
    const figures = derivePullFigures(pull(1), 'SAE_J1349_2004', hotDay)
    for (const { id } of CORRECTION_STANDARDS) {
      const target = id === 'UNCORRECTED' ? 1 : correctionFactor(id, hotDay)
      expect(figures.standards[id].ratio, id).toBeCloseTo(target / correctionFactor('SAE_J1349_2004', hotDay), 12)
    }
    expect(figures.standards.SAE_J1349_2004.ratio).toBe(1)
  })

  it('finds DIN 70020\'s factor 1 at its own reference air, 20 °C and 1013 mbar (DIN 70020)', () => {
    // 1013 mbar = 29.9139 inHg (1 inHg = 33.8639 mbar, NIST SP 811); 20 °C = 68 °F.
    const reference = { baroInHg: 1013 / 33.8639, airTempF: 68, humidityPct: 0 }
    const figures = derivePullFigures(pull(2), 'UNCORRECTED', reference)
    expect(figures.standards.DIN_70020.ratio).toBeCloseTo(1, 4)
  })

  it('stores under each standard the peaks of the converted curve, to 0.1', () => {
    const points = pull(3)
    const figures = derivePullFigures(points, 'UNCORRECTED', hotDay)
    for (const { id } of CORRECTION_STANDARDS) {
      const pk = peaks(convertCurve(points, { standard: 'UNCORRECTED', weather: hotDay }, { standard: id, weather: hotDay }).points)
      expect(figures.standards[id].peakHp, id).toBe(Math.round(pk.peakHp * 10) / 10)
      expect(figures.standards[id].peakHpRpm, id).toBe(pk.peakHpRpm)
    }
  })

  it('leaves every figure uncorrected (factor 1) when the weather is unknown', () => {
    const figures = derivePullFigures(pull(4), 'SAE_J1349_2004', null)
    for (const { id } of CORRECTION_STANDARDS) expect(figures.standards[id], id).toMatchObject({ ratio: 1, uncorrected: true })
    expect(figures.standards.SAE_J1349_2004.notes.join(' ')).toMatch(/uncorrected/)
  })

  it('keeps a dense pull\'s display curve within the page\'s bound and a search grid every 100 rpm', () => {
    const dense = pull(5, 5)
    expect(dense.length).toBeGreaterThan(DISPLAY_MAX_POINTS)
    const figures = derivePullFigures(dense, 'SAE_J1349_2004', hotDay)
    expect(figures.curve.length).toBeLessThanOrEqual(DISPLAY_MAX_POINTS)
    expect(figures.searchCurve!.startRpm).toBe(dense[0]!.rpm)
    expect(figures.searchCurve!.hp).toHaveLength(Math.floor((dense.at(-1)!.rpm - dense[0]!.rpm) / 100) + 1)
  })

  it('converts the stored curve to a standard by multiplying by its factor', () => {
    const points = pull(6)
    const figures = derivePullFigures(points, 'SAE_J1349_2004', hotDay)
    const expected = convertCurve(points, { standard: 'SAE_J1349_2004', weather: hotDay }, { standard: 'DIN_70020', weather: hotDay }).points
    const shown = curveUnder(figures, 'DIN_70020')
    shown.forEach((p, i) => expect(Math.abs(p.hp - expected[i]!.hp), `rpm ${p.rpm}`).toBeLessThanOrEqual(0.05 + 1e-9))
  })
})

describe('a stored pull row as the engine\'s input', () => {
  it('has weather only with all three readings, and counts an unknown standard name as uncorrected', () => {
    expect(weatherOf({ baroInHg: 29.1, airTempF: 70, humidityPct: 40 })).toEqual({ baroInHg: 29.1, airTempF: 70, humidityPct: 40 })
    expect(weatherOf({ baroInHg: 29.1, airTempF: null, humidityPct: 40 })).toBeNull()
    expect(declaredStandardOf({ declaredStandard: 'DIN_70020' })).toBe('DIN_70020')
    expect(declaredStandardOf({ declaredStandard: 'SOMETHING_ELSE' })).toBe('UNCORRECTED')
  })
})

describe('the build page\'s packed curves', () => {
  it('unpack to exactly the curves that were packed', () => {
    const curves: BuildCurves = {
      slug: 'x', standard: 'SAE_J1349_2004', headlineId: 1, headlineBasis: 'verified',
      pulls: [{
        id: 1, label: 'a', sha256: 'f'.repeat(64), status: 'verified', dynoKind: 'engine', declaredStandard: 'SAE_J1349_2004', weather: null, comparisonRole: 'baseline',
        changeKind: null, changeNote: null, standard: 'UNCORRECTED', uncorrected: true, notes: ['n'], points: [{ rpm: 3000, hp: 300.1, lbFt: 525.4 }, { rpm: 3100, hp: 310.2, lbFt: 525.6 }],
        peaks: { peakHp: 310.2, peakHpRpm: 3100, peakTq: 525.6, peakTqRpm: 3100 },
      }],
      comparisons: [{ baselineId: 1, variantId: 2, changeKind: 'heads', changeNote: null, points: [{ rpm: 3000, hpDelta: 4.2, tqDelta: -1.1 }], sentence: 's', maxGainHp: 4.2, maxGainRpm: 3000, maxLossHp: 0, maxLossRpm: null }],
    }
    const packed = packCurves(curves)
    expect(packed.pulls[0]!.hp).toEqual([300.1, 310.2])
    expect(unpackCurves(packed)).toEqual(curves)
  })
})
