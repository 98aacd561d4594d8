import { describe, expect, it } from 'vitest'
import {
  airflowCfm, camEvents, correctionValidity, dynamicCompressionRatio, displacementCi, fuelDefaults, hpFromTorque, bmepPsi,
  injectorSizeLbHr, lbHrToCcMin, meanPistonSpeedFtMin, rodStrokeRatio,
} from '../../shared/engine'
import {
  airflowFields, airflowSchema, camFields, camSchema, commonBsfc, compressionFields, compressionSchema, correctionFields,
  correctionSchema, correctionStandardSchema, displacementFields, displacementSchema, fieldUnit, fuelChoiceSchema, fuelFields,
  fuelSchema, pistonFields, pistonSchema, powerFields, powerSchema, rangeErrorMessage, rewriteValue, timingBasisSchema, type ToolField,
} from '../../shared/schemas/tools'
import { UNIT_SYSTEMS, convertBetween, type UnitSystem } from '../../shared/tools/quantities'

const messages = (result: { success: boolean, error?: { issues: { path: PropertyKey[], message: string }[] } }) =>
  Object.fromEntries((result.error?.issues ?? []).map(i => [String(i.path[0]), i.message]))

// Every calculator with a typical engine's figures (invented), the schema and the module call it feeds.
const calculators: { name: string, fields: readonly ToolField[], values: Record<string, string>, parse: (s: UnitSystem) => { safeParse: (v: unknown) => { success: boolean, data?: unknown } }, run: (v: never) => unknown }[] = [
  { name: 'displacement', fields: displacementFields, values: { boreIn: '4.030', strokeIn: '3.480', cylinders: '8', rodLengthIn: '5.700' }, parse: displacementSchema, run: (v: { boreIn: number, strokeIn: number, cylinders: number, rodLengthIn: number }) => [displacementCi(v.boreIn, v.strokeIn, v.cylinders), rodStrokeRatio(v.rodLengthIn, v.strokeIn)] },
  { name: 'compression', fields: compressionFields, values: { boreIn: '4.030', strokeIn: '3.480', rodLengthIn: '5.700', chamberCc: '64', pistonCc: '5', gasketBoreIn: '4.100', gasketThicknessIn: '0.040', deckClearanceIn: '0.005', intakeClosesAbdcDeg: '36' }, parse: compressionSchema, run: dynamicCompressionRatio },
  { name: 'cam', fields: camFields, values: { intakeDurationDeg: '224', exhaustDurationDeg: '232', lobeSeparationDeg: '112', intakeCenterlineDeg: '108' }, parse: camSchema, run: camEvents },
  { name: 'power', fields: powerFields, values: { lbFt: '450', rpm: '5200', displacementCi: '355' }, parse: powerSchema, run: (v: { lbFt: number, rpm: number, displacementCi: number }) => [hpFromTorque(v.lbFt, v.rpm), bmepPsi(v.lbFt, v.displacementCi)] },
  { name: 'piston', fields: pistonFields, values: { strokeIn: '3.480', rodLengthIn: '5.700', rpm: '7000' }, parse: pistonSchema, run: (v: { strokeIn: number, rpm: number }) => meanPistonSpeedFtMin(v.strokeIn, v.rpm) },
  { name: 'airflow', fields: airflowFields, values: { displacementCi: '355', rpm: '6500', volumetricEfficiency: '90' }, parse: airflowSchema, run: (v: { displacementCi: number, rpm: number, volumetricEfficiency: number }) => airflowCfm(v.displacementCi, v.rpm, v.volumetricEfficiency) },
  { name: 'fuel', fields: fuelFields, values: { hp: '600', bsfc: '0.50', injectors: '8', maxDutyCycle: '80' }, parse: fuelSchema, run: (v: { hp: number, bsfc: number, injectors: number, maxDutyCycle: number }) => lbHrToCcMin(injectorSizeLbHr(v), 0.74) },
  { name: 'correction', fields: correctionFields, values: { baroInHg: '29.38', airTempF: '84', humidityPct: '45', observedHp: '' }, parse: correctionSchema, run: (v: { baroInHg: number, airTempF: number, humidityPct: number }) => correctionValidity('SAE_J1349_2004', v) },
]

describe('calculator inputs: the form accepts only what the engine module accepts', () => {
  for (const c of calculators) {
    it(`${c.name}: each field at either end of its range, in both unit systems, computes without a RangeError`, () => {
      for (const system of UNIT_SYSTEMS) {
        const base = Object.fromEntries(c.fields.map(f => [f.key, rewriteValue(f, c.values[f.key]!, 'imperial', system)]))
        expect(c.parse(system).safeParse(base).success, `${c.name} defaults in ${system}`).toBe(true)
        for (const f of c.fields) {
          for (const end of f.range[system]) {
            const parsed = c.parse(system).safeParse({ ...base, [f.key]: String(end) })
            // Rod against stroke is the one cross-field rule the form checks itself.
            if (!parsed.success) {
              expect(f.key === 'strokeIn' || f.key === 'rodLengthIn', `${c.name}.${f.key}=${end} ${system}`).toBe(true)
              continue
            }
            expect(() => c.run(parsed.data as never), `${c.name}.${f.key}=${end} ${system}`).not.toThrow()
          }
        }
      }
    })
  }
})

describe('calculator inputs: units and messages', () => {
  it('metric text reaches the module in its imperial units (1 in = 25.4 mm exactly, NIST SP 811)', () => {
    const r = displacementSchema('metric').safeParse({ boreIn: '101.6', strokeIn: '88.9', cylinders: '8', rodLengthIn: '152.4' })
    expect(r.success).toBe(true)
    expect(r.data!.boreIn).toBeCloseTo(4, 12)
    expect(r.data!.strokeIn).toBeCloseTo(3.5, 12)
    expect(r.data!.rodLengthIn).toBeCloseTo(6, 12)
  })

  it('percent fields reach the module as fractions, and an empty optional field as undefined', () => {
    expect(fuelSchema('imperial').safeParse({ hp: '600', bsfc: '0.5', injectors: '8', maxDutyCycle: '80' }).data!.maxDutyCycle).toBeCloseTo(0.8, 12)
    const weather = correctionSchema('metric').safeParse({ baroInHg: '101.325', airTempF: '25', humidityPct: '0', observedHp: '' })
    expect(weather.data!.airTempF).toBeCloseTo(77, 10)
    // 1 inHg = 3.386389 kPa (NIST SP 811 B.8): 101.325 kPa is 29.921 inHg.
    expect(weather.data!.baroInHg).toBeCloseTo(29.921, 3)
    expect(weather.data!.observedHp).toBeUndefined()
  })

  it('says what is wrong in the unit on screen: blank, not a number, out of range, not whole', () => {
    const m = messages(displacementSchema('metric').safeParse({ boreIn: '', strokeIn: '3,48', cylinders: '8.5', rodLengthIn: '20' }))
    expect(m.boreIn).toBe('Bore: enter a number')
    expect(m.strokeIn).toMatch(/^Stroke must be a number/)
    expect(m.cylinders).toBe('Cylinders must be a whole number')
    expect(m.rodLengthIn).toBe('Rod length must lie between 50 and 300 mm')
    expect(messages(displacementSchema('imperial').safeParse({ boreIn: '9', strokeIn: '3.48', cylinders: '8', rodLengthIn: '5.7' })).boreIn)
      .toBe('Bore must lie between 1 and 8 in')
  })

  it('refuses a rod no longer than half the stroke, beside the rod field', () => {
    const m = messages(pistonSchema('imperial').safeParse({ strokeIn: '6', rodLengthIn: '2.9', rpm: '6000' }))
    expect(m.rodLengthIn).toBe('Rod length must be longer than half the stroke')
  })

  it('puts a module RangeError beside the field it names, with the field\'s own label', () => {
    const named = rangeErrorMessage(compressionFields, new RangeError('rodLengthIn (1) must be longer than half the stroke (1.74)'), 'pistonCc')
    expect(named).toEqual({ rodLengthIn: 'Rod length (1) must be longer than half the stroke (1.74)' })
    // A 20 cc dome in a 10 cc chamber: every field is in range, but nothing is left above the piston.
    const domed = compressionSchema('imperial').parse({ boreIn: '4', strokeIn: '3.5', rodLengthIn: '6', chamberCc: '10', pistonCc: '-20', gasketBoreIn: '4.1', gasketThicknessIn: '0.02', deckClearanceIn: '0', intakeClosesAbdcDeg: '40' })
    let thrown: unknown
    try {
      dynamicCompressionRatio(domed)
    }
    catch (error) {
      thrown = error
    }
    expect(thrown).toBeInstanceOf(RangeError)
    const unnamed = rangeErrorMessage(compressionFields, thrown as RangeError, 'pistonCc')
    expect(Object.keys(unnamed)).toEqual(['pistonCc'])
    expect(unnamed.pistonCc).toMatch(/^Piston top volume: these dimensions leave no clearance volume/)
  })

  it('rewrites typed values into the other system and back, and leaves text that is not a number alone', () => {
    const bore = displacementFields[0]
    expect(rewriteValue(bore, '4.000', 'imperial', 'metric')).toBe('101.60')
    expect(rewriteValue(bore, '101.60', 'metric', 'imperial')).toBe('4.000')
    expect(rewriteValue(bore, 'abc', 'imperial', 'metric')).toBe('abc')
    expect(rewriteValue(bore, '', 'imperial', 'metric')).toBe('')
    const cylinders = displacementFields[2]
    expect(rewriteValue(cylinders, '8', 'imperial', 'metric')).toBe('8')
    expect(fieldUnit(bore, 'metric')).toBe('mm')
    expect(fieldUnit(correctionFields[1], 'metric')).toBe('°C')
    expect(convertBetween('temperature', 212, 'imperial', 'metric')).toBeCloseTo(100, 12)
  })

  it('BSFC starting points are the module\'s common-practice figures (common practice)', () => {
    expect(commonBsfc('pump_gas', 'none')).toBe(fuelDefaults.pump_gas.bsfcNa)
    expect(commonBsfc('e85', 'nitrous')).toBe(fuelDefaults.e85.bsfcBoosted)
    expect(commonBsfc('methanol', 'turbo')).toBe(fuelDefaults.methanol.bsfcBoosted)
  })

  it('refuses an unknown fuel, power adder or standard with a message naming the choices', () => {
    const fuel = fuelChoiceSchema.safeParse({ fuel: 'diesel', adder: 'none' })
    expect(fuel.success).toBe(false)
    expect(fuel.error!.issues[0]!.message).toContain('pump_gas')
    expect(fuelChoiceSchema.safeParse({ fuel: 'e85', adder: 'rocket' }).success).toBe(false)
    expect(correctionStandardSchema.safeParse('UNCORRECTED').success).toBe(false)
    expect(correctionStandardSchema.safeParse('DIN_70020').success).toBe(true)
  })
})

describe('cam card timing basis', () => {
  it('accepts 0.050 in lift and seat timing only, the module\'s two bases', () => {
    expect(timingBasisSchema.safeParse('lift050').success).toBe(true)
    expect(timingBasisSchema.safeParse('seat').success).toBe(true)
    const r = timingBasisSchema.safeParse('advertised')
    expect(r.success).toBe(false)
    expect(r.error!.issues[0]!.message).toBe('Timing basis must be one of lift050, seat')
  })
})
