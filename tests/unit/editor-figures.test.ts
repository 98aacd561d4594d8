import { describe, expect, it } from 'vitest'
import { bmepPsi, camEvents, displacementCi, dynamicCompressionRatio, rodStrokeRatio, staticCompressionRatio } from '../../shared/engine'
import { combinationFigures, type FigureInputs } from '../../shared/builds/figures'
import { centsToInput, dollarsToCents } from '../../utils/editor-fields'
import { emptyPullForm, pullMetaFrom } from '../../utils/pull-form'

// An invented small-block combination (values from memory of common practice).
const full: FigureInputs = {
  cylinders: 8, boreIn: 4.03, strokeIn: 3.75, rodLengthIn: 6, chamberCc: 64, pistonCc: 5, gasketBoreIn: 4.1, gasketThicknessIn: 0.04, deckClearanceIn: 0.005,
  camIntakeDurationDeg: 236, camExhaustDurationDeg: 244, camLobeSeparationDeg: 110, camIntakeCenterlineDeg: 106,
}
const empty: FigureInputs = Object.fromEntries(Object.keys(full).map(k => [k, null])) as unknown as FigureInputs

describe('the editor\'s live figures', () => {
  it('are the engine module\'s own results for a complete combination', () => {
    const f = combinationFigures(full, 455)
    expect(f.displacementCi).toBe(displacementCi(4.03, 3.75, 8))
    expect(f.rodStroke).toBe(rodStrokeRatio(6, 3.75))
    expect(f.staticCompression).toBe(staticCompressionRatio(full as Required<{ [K in keyof FigureInputs]: number }>))
    const cam = camEvents({ intakeDurationDeg: 236, exhaustDurationDeg: 244, lobeSeparationDeg: 110, intakeCenterlineDeg: 106 })
    expect(f.cam).toEqual(cam)
    expect(f.dynamicCompression).toBe(dynamicCompressionRatio({ ...(full as Required<{ [K in keyof FigureInputs]: number }>), intakeClosesAbdcDeg: cam.intakeClosesAbdcDeg, timingBasis: 'lift050' }))
    expect(f.bmepPsi).toBe(bmepPsi(455, displacementCi(4.03, 3.75, 8)))
  })

  it('stay empty until the fields they need are typed, and never throw on impossible values', () => {
    expect(combinationFigures(empty)).toEqual({ displacementCi: null, rodStroke: null, staticCompression: null, dynamicCompression: null, cam: null, bmepPsi: null, bmepKpa: null })
    const partial = combinationFigures({ ...empty, boreIn: 4.03, strokeIn: 3.75, cylinders: 8 })
    expect(partial.displacementCi).toBeCloseTo(382.7, 1)
    expect(partial.staticCompression).toBeNull()
    expect(partial.bmepPsi).toBeNull()
    expect(combinationFigures({ ...full, chamberCc: 1, pistonCc: -80 }).staticCompression).toBeNull()
    expect(combinationFigures({ ...full, rodLengthIn: 1 }).dynamicCompression).toBeNull()
  })
})

describe('money typed in the editor', () => {
  it('reads dollars to integer cents without floating-point drift', () => {
    expect(dollarsToCents('14,500')).toBe(1_450_000)
    expect(dollarsToCents('$129.95')).toBe(12_995)
    expect(dollarsToCents('0.1')).toBe(10)
    expect(dollarsToCents('')).toBeNull()
    expect(dollarsToCents('12.345')).toBeNaN()
    expect(dollarsToCents('twelve')).toBeNaN()
  })

  it('shows cents back as the shop would type them', () => {
    expect(centsToInput(1_450_000)).toBe('14500')
    expect(centsToInput(12_995)).toBe('129.95')
    expect(centsToInput(null)).toBe('')
  })
})

describe('the pull form', () => {
  const typed = { ...emptyPullForm(), label: 'Final pull' }
  it('sends no weather when every weather box is empty', () => {
    const r = pullMetaFrom(typed)
    expect(r.ok && r.meta.weather).toBeNull()
  })

  it('asks for all three weather readings once one is typed', () => {
    const r = pullMetaFrom({ ...typed, baroInHg: '29.4' })
    expect(r.ok).toBe(false)
    expect(!r.ok && r.message).toMatch(/barometer, air temperature and humidity together/)
  })

  it('reads numbers and the comparison fields', () => {
    const r = pullMetaFrom({ ...typed, baroInHg: '29.4', airTempF: '72', humidityPct: '40', declaredPeakHp: '1,012.5', comparisonRole: 'variant', changeKind: 'heads' })
    expect(r.ok).toBe(true)
    if (!r.ok) return
    expect(r.meta.weather).toEqual({ baroInHg: 29.4, airTempF: 72, humidityPct: 40 })
    expect(r.meta.declaredPeakHp).toBe(1012.5)
    expect(r.meta.changeKind).toBe('heads')
  })
})

describe('dynamic compression of a build', () => {
  it('takes the build\'s cam closing at 0.050 in and moves it 15° later to seat timing (common practice)', () => {
    const cam = camEvents({ intakeDurationDeg: full.camIntakeDurationDeg!, exhaustDurationDeg: full.camExhaustDurationDeg!, lobeSeparationDeg: full.camLobeSeparationDeg!, intakeCenterlineDeg: full.camIntakeCenterlineDeg! })
    const asSeat = dynamicCompressionRatio({ ...(full as Required<{ [K in keyof FigureInputs]: number }>), intakeClosesAbdcDeg: cam.intakeClosesAbdcDeg + 15, timingBasis: 'seat' })
    expect(combinationFigures(full).dynamicCompression).toBeCloseTo(asSeat, 10)
    // A later closing traps less charge: the seat-basis figure is below one read straight off the 0.050 in closing.
    const unshifted = dynamicCompressionRatio({ ...(full as Required<{ [K in keyof FigureInputs]: number }>), intakeClosesAbdcDeg: cam.intakeClosesAbdcDeg, timingBasis: 'seat' })
    expect(combinationFigures(full).dynamicCompression!).toBeLessThan(unshifted)
  })
})
