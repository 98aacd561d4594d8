import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { camEvents } from '../../../shared/engine'

// Cam card arithmetic is common practice; the cams here are invented.
describe('valve events from duration, lobe separation and intake centreline', () => {
  it('a symmetric cam with duration/2 = LSA, installed straight up, has zero overlap (cam card arithmetic, common practice)', () => {
    const e = camEvents({ intakeDurationDeg: 224, exhaustDurationDeg: 224, lobeSeparationDeg: 112, intakeCenterlineDeg: 112 })
    expect(e.intakeOpensBtdcDeg).toBeCloseTo(0, 12)
    expect(e.exhaustClosesAtdcDeg).toBeCloseTo(0, 12)
    expect(e.overlapDeg).toBeCloseTo(0, 12)
    expect(e.advanceDeg).toBeCloseTo(0, 12)
  })

  it('an invented 236/242 on 110, installed at 106: events as a cam card would list them', () => {
    const e = camEvents({ intakeDurationDeg: 236, exhaustDurationDeg: 242, lobeSeparationDeg: 110, intakeCenterlineDeg: 106 })
    // Worked by hand from the definitions: IVO = 118 − 106, IVC = 118 + 106 − 180, ECL = 220 − 106,
    // EVO = 121 + 114 − 180, EVC = 121 − 114.
    expect(e.intakeOpensBtdcDeg).toBeCloseTo(12, 12)
    expect(e.intakeClosesAbdcDeg).toBeCloseTo(44, 12)
    expect(e.exhaustCenterlineDeg).toBeCloseTo(114, 12)
    expect(e.exhaustOpensBbdcDeg).toBeCloseTo(55, 12)
    expect(e.exhaustClosesAtdcDeg).toBeCloseTo(7, 12)
    expect(e.overlapDeg).toBeCloseTo(19, 12)
    expect(e.advanceDeg).toBeCloseTo(4, 12)
  })

  it('events add back up to the durations and centrelines, and overlap = (int + exh)/2 − 2 × LSA (property; textbook relations)', () => {
    fc.assert(fc.property(
      fc.double({ min: 180, max: 320, noNaN: true }), fc.double({ min: 180, max: 320, noNaN: true }),
      fc.double({ min: 100, max: 120, noNaN: true }), fc.double({ min: -6, max: 8, noNaN: true }),
      (intDur, exhDur, lsa, advance) => {
        const icl = lsa - advance
        const e = camEvents({ intakeDurationDeg: intDur, exhaustDurationDeg: exhDur, lobeSeparationDeg: lsa, intakeCenterlineDeg: icl })
        const close = (a: number, b: number): boolean => Math.abs(a - b) < 1e-9
        return close(e.intakeOpensBtdcDeg + 180 + e.intakeClosesAbdcDeg, intDur)
          && close(e.exhaustOpensBbdcDeg + 180 + e.exhaustClosesAtdcDeg, exhDur)
          && close((180 + e.intakeClosesAbdcDeg - e.intakeOpensBtdcDeg) / 2, icl)
          && close((180 + e.exhaustOpensBbdcDeg - e.exhaustClosesAtdcDeg) / 2, e.exhaustCenterlineDeg)
          && close((icl + e.exhaustCenterlineDeg) / 2, lsa)
          && close(e.overlapDeg, (intDur + exhDur) / 2 - 2 * lsa)
      },
    ))
  })

  it('advancing the cam opens and closes the intake earlier by the same amount (property)', () => {
    fc.assert(fc.property(fc.double({ min: 0.5, max: 6, noNaN: true }), (shift) => {
      const spec = { intakeDurationDeg: 230, exhaustDurationDeg: 236, lobeSeparationDeg: 112, intakeCenterlineDeg: 110 }
      const a = camEvents(spec)
      const b = camEvents({ ...spec, intakeCenterlineDeg: 110 - shift })
      return Math.abs(b.intakeOpensBtdcDeg - a.intakeOpensBtdcDeg - shift) < 1e-9 && Math.abs(a.intakeClosesAbdcDeg - b.intakeClosesAbdcDeg - shift) < 1e-9
    }))
  })

  it('throws a RangeError on impossible durations or angles', () => {
    expect(() => camEvents({ intakeDurationDeg: -10, exhaustDurationDeg: 230, lobeSeparationDeg: 112, intakeCenterlineDeg: 108 })).toThrow(RangeError)
    expect(() => camEvents({ intakeDurationDeg: 230, exhaustDurationDeg: 400, lobeSeparationDeg: 112, intakeCenterlineDeg: 108 })).toThrow(RangeError)
    expect(() => camEvents({ intakeDurationDeg: 230, exhaustDurationDeg: 230, lobeSeparationDeg: 0, intakeCenterlineDeg: 108 })).toThrow(RangeError)
  })
})
