import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import {
  SEAT_CLOSING_OFFSET_DEG, ciToLitres, displacementCi, dynamicCompressionRatio, seatIntakeClosingAbdcDeg, litresToCi, meanPistonSpeedFtMin, pistonTravelIn,
  rodStrokeRatio, staticCompressionRatio,
} from '../../../shared/engine'
import type { CompressionInput } from '../../../shared/engine'
import { math, rel } from './helpers'

const smallBlock: CompressionInput = {
  boreIn: 4.03, strokeIn: 3.48, chamberCc: 64, pistonCc: 5, gasketBoreIn: 4.1, gasketThicknessIn: 0.039, deckClearanceIn: 0.025,
}

describe('displacement', () => {
  it('350 ci from 4.000 × 3.480 × 8 (handbook arithmetic π/4 × bore² × stroke × cylinders, common practice: sold as 350)', () => {
    const ci = displacementCi(4, 3.48, 8)
    expect(Math.round(ci)).toBe(350)
    expect(Math.abs(ci - 349.85)).toBeLessThan(0.005)
    expect(rel(ci, math.evaluate('pi / 4 * (4 in)^2 * 3.48 in * 8').toNumber('cuin'))).toBeLessThan(1e-12)
  })
  it('a 350 ci engine is 5.7 litres (common practice naming), 1 in³ = 16.387064 cm³ (NIST SP 811)', () => {
    expect(ciToLitres(350).toFixed(1)).toBe('5.7')
    expect(rel(litresToCi(ciToLitres(427)), 427)).toBeLessThan(1e-12)
  })
  it('ci → litres agrees with mathjs units (cuin → l)', () => {
    const ci = displacementCi(4.125, 4, 8)
    expect(rel(ciToLitres(ci), math.unit(ci, 'cuin').toNumber('l'))).toBeLessThan(1e-12)
  })
  it('throws a RangeError on a negative bore, zero cylinders or a fractional cylinder count', () => {
    expect(() => displacementCi(-4, 3.48, 8)).toThrow(RangeError)
    expect(() => displacementCi(4, 3.48, 0)).toThrow(RangeError)
    expect(() => displacementCi(4, 3.48, 7.5)).toThrow(RangeError)
    expect(() => displacementCi(4, 0, 8)).toThrow(/strokeIn/)
  })
})

describe('static compression ratio', () => {
  it('(swept + clearance) / clearance, volumes worked in cm³ from metric dimensions (handbook definition)', () => {
    // Independent arithmetic in centimetres: bore 10.2362 cm, stroke 8.8392 cm, gasket 10.414 cm × 0.09906 cm, deck 0.0635 cm.
    const area = (dCm: number): number => (Math.PI / 4) * dCm * dCm
    const swept = area(4.03 * 2.54) * 3.48 * 2.54
    const gasket = area(4.1 * 2.54) * 0.039 * 2.54
    const deck = area(4.03 * 2.54) * 0.025 * 2.54
    const clearance = 64 + 5 + gasket + deck
    const expected = (swept + clearance) / clearance
    expect(rel(staticCompressionRatio(smallBlock), expected)).toBeLessThan(1e-12)
    expect(expected).toBeGreaterThan(9.5)
    expect(expected).toBeLessThan(10)
  })
  it('a dome (negative pistonCc) and a piston out of the hole (negative deck) raise compression', () => {
    const flat = staticCompressionRatio({ ...smallBlock, pistonCc: 0 })
    expect(staticCompressionRatio({ ...smallBlock, pistonCc: -6 })).toBeGreaterThan(flat)
    expect(staticCompressionRatio({ ...smallBlock, pistonCc: 0, deckClearanceIn: -0.005 })).toBeGreaterThan(flat)
  })
  it('compression rises as the chamber shrinks (property)', () => {
    fc.assert(fc.property(
      fc.double({ min: 40, max: 120, noNaN: true }), fc.double({ min: 0.5, max: 30, noNaN: true }),
      fc.double({ min: 3, max: 4.6, noNaN: true }), fc.double({ min: 2.8, max: 4.5, noNaN: true }),
      (chamber, shrink, bore, stroke) => {
        const input = { ...smallBlock, boreIn: bore, gasketBoreIn: bore + 0.05, strokeIn: stroke, chamberCc: chamber }
        return staticCompressionRatio({ ...input, chamberCc: chamber - shrink * 0.9 }) > staticCompressionRatio(input)
      },
    ))
  })
  it('throws a RangeError when a dome leaves no clearance volume, or on a negative chamber', () => {
    expect(() => staticCompressionRatio({ ...smallBlock, pistonCc: -90 })).toThrow(RangeError)
    expect(() => staticCompressionRatio({ ...smallBlock, chamberCc: -64 })).toThrow(RangeError)
    expect(() => staticCompressionRatio({ ...smallBlock, gasketThicknessIn: -0.04 })).toThrow(RangeError)
  })
})

describe('crank-slider geometry and dynamic compression', () => {
  it('piston travel is 0 at TDC, the stroke at BDC and l + a − √(l² − a²) at 90° (Heywood 1988, eq. 2.3)', () => {
    const a = 3.48 / 2
    const l = 5.7
    expect(pistonTravelIn(3.48, l, 0)).toBeCloseTo(0, 12)
    expect(pistonTravelIn(3.48, l, 180)).toBeCloseTo(3.48, 12)
    expect(pistonTravelIn(3.48, l, 90)).toBeCloseTo(l + a - Math.sqrt(l * l - a * a), 12)
  })
  it('matches Heywood\'s cylinder-volume relation V/Vc = 1 + ½(rc − 1)[R + 1 − cos θ − (R² − sin² θ)^½] (Heywood 1988, eq. 2.4)', () => {
    const rc = staticCompressionRatio(smallBlock)
    const rod = 5.7
    for (const ivc of [0, 30, 50, 64, 80, 100]) {
      const R = rod / (3.48 / 2)
      const th = ((180 + ivc) * Math.PI) / 180
      const expected = 1 + 0.5 * (rc - 1) * (R + 1 - Math.cos(th) - Math.sqrt(R * R - Math.sin(th) ** 2))
      expect(rel(dynamicCompressionRatio({ ...smallBlock, rodLengthIn: rod, intakeClosesAbdcDeg: ivc }), expected)).toBeLessThan(1e-12)
    }
  })
  it('equals the static ratio when the intake closes at BDC and falls as it closes later (property)', () => {
    const base = { ...smallBlock, rodLengthIn: 5.7 }
    expect(dynamicCompressionRatio({ ...base, intakeClosesAbdcDeg: 0 })).toBeCloseTo(staticCompressionRatio(smallBlock), 12)
    fc.assert(fc.property(fc.double({ min: 1, max: 120, noNaN: true }), fc.double({ min: 0.5, max: 40, noNaN: true }), (ivc, later) =>
      dynamicCompressionRatio({ ...base, intakeClosesAbdcDeg: ivc + later }) < dynamicCompressionRatio({ ...base, intakeClosesAbdcDeg: ivc })))
  })
  it('throws a RangeError on a rod no longer than half the stroke, or an intake closing outside 0–179° ABDC', () => {
    expect(() => dynamicCompressionRatio({ ...smallBlock, rodLengthIn: 1.5, intakeClosesAbdcDeg: 60 })).toThrow(RangeError)
    expect(() => dynamicCompressionRatio({ ...smallBlock, rodLengthIn: 5.7, intakeClosesAbdcDeg: -5 })).toThrow(RangeError)
    expect(() => dynamicCompressionRatio({ ...smallBlock, rodLengthIn: 5.7, intakeClosesAbdcDeg: 200 })).toThrow(RangeError)
  })
})

describe('dynamic compression: the timing basis of the intake closing', () => {
  // The calculator page's default engine (invented): 4.030 × 3.480 in, 5.700 in rod, 64 cc chamber, 5 cc dish.
  const page = { boreIn: 4.03, strokeIn: 3.48, rodLengthIn: 5.7, chamberCc: 64, pistonCc: 5, gasketBoreIn: 4.1, gasketThicknessIn: 0.04, deckClearanceIn: 0.005 }
  const heywood = (ivc: number) => {
    // Heywood 1988, eq. 2.4: V/Vc = 1 + ½(rc − 1)[R + 1 − cos θ − (R² − sin² θ)^½], θ = 180° + IVC.
    const rc = staticCompressionRatio(page)
    const R = page.rodLengthIn / (page.strokeIn / 2)
    const th = ((180 + ivc) * Math.PI) / 180
    return 1 + 0.5 * (rc - 1) * (R + 1 - Math.cos(th) - Math.sqrt(R * R - Math.sin(th) ** 2))
  }
  it('a 0.050 in closing is moved 15° later to the seat (common practice offset) before the geometry is applied', () => {
    expect(SEAT_CLOSING_OFFSET_DEG).toBe(15)
    expect(seatIntakeClosingAbdcDeg(36, 'lift050')).toBe(51)
    expect(seatIntakeClosingAbdcDeg(51, 'seat')).toBe(51)
    expect(() => seatIntakeClosingAbdcDeg(36, 'advertised' as never)).toThrow(/timingBasis/)
  })
  it('36° ABDC at 0.050 in reads 8.96, the figure at 51° seat (Heywood eq. 2.4); taken as seat timing it would read 9.61', () => {
    const at050 = dynamicCompressionRatio({ ...page, intakeClosesAbdcDeg: 36, timingBasis: 'lift050' })
    const atSeat = dynamicCompressionRatio({ ...page, intakeClosesAbdcDeg: 51, timingBasis: 'seat' })
    expect(rel(at050, heywood(51))).toBeLessThan(1e-12)
    expect(at050).toBe(atSeat)
    expect(at050.toFixed(2)).toBe('8.96')
    expect(dynamicCompressionRatio({ ...page, intakeClosesAbdcDeg: 36, timingBasis: 'seat' }).toFixed(2)).toBe('9.61')
    // Left out, the closing is taken as the seat closing.
    expect(dynamicCompressionRatio({ ...page, intakeClosesAbdcDeg: 36 })).toBe(dynamicCompressionRatio({ ...page, intakeClosesAbdcDeg: 36, timingBasis: 'seat' }))
  })
})

describe('piston speed and rod ratio', () => {
  it('mean piston speed = 2 × stroke × rpm (Heywood 1988, §2.2), cross-checked with mathjs units', () => {
    const expected = math.evaluate('2 * 3.48 in * 6000 / minute').toNumber('ft/min')
    expect(rel(meanPistonSpeedFtMin(3.48, 6000), expected)).toBeLessThan(1e-12)
    expect(meanPistonSpeedFtMin(3.48, 6000)).toBeCloseTo(3480, 9)
  })
  it('rod/stroke of a 5.7 in rod on a 3.48 in stroke is 1.64 (common practice figure for this pairing)', () => {
    expect(rodStrokeRatio(5.7, 3.48).toFixed(2)).toBe('1.64')
    expect(() => rodStrokeRatio(-5.7, 3.48)).toThrow(RangeError)
  })
  it('throws a RangeError on a negative rpm', () => {
    expect(() => meanPistonSpeedFtMin(3.48, -10)).toThrow(RangeError)
  })
})
