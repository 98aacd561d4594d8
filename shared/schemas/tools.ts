import { z } from 'zod'
import { CORRECTION_STANDARDS, type CorrectionStandard, type FuelKey } from '../engine/types'
import { fuelDefaults } from '../engine/fuel'
import { VALVE_TIMING_BASES, type ValveTimingBasis } from '../engine/geometry'
import { type Quantity, type UnitSystem, convertBetween, toImperial, unitOf } from '../tools/quantities'

/**
 * The calculators page's inputs. Each field is typed as text, checked here in the unit the
 * person is working in, then handed to the engine module in its own (imperial) units, under the
 * module's own argument names so a RangeError it raises can be shown beside the field it names.
 */
export interface ToolField<K extends string = string> {
  key: K
  label: string
  /** A quantity whose unit follows the unit system; absent for fixed units (rpm, °, %, cc). */
  quantity?: Quantity
  /** The unit of a fixed-unit field. */
  unit?: string
  /** Allowed range in each system (a fixed-unit field gives the same range for both). */
  range: Record<UnitSystem, readonly [number, number]>
  /** Decimal places a converted value is written with, per system. */
  digits: Record<UnitSystem, number>
  integer?: boolean
  /** Entered in %, handed to the module as a fraction (80 → 0.8). */
  fraction?: boolean
  /** May be left empty. */
  optional?: boolean
  hint?: string
}

export type ToolInput<K extends string> = { [P in K]: number }
export type ToolValues<K extends string> = { [P in K]: string }

const same = (min: number, max: number) => ({ imperial: [min, max] as const, metric: [min, max] as const })
const both = (digits: number) => ({ imperial: digits, metric: digits })

/** The unit a field is entered in under a system. */
export function fieldUnit(field: ToolField, system: UnitSystem): string {
  return field.quantity ? unitOf(field.quantity, system) : (field.unit ?? '')
}

const NUMBER_TEXT = /^[-+]?(?:\d+\.?\d*|\.\d+)$/

/** One field: text that is a number inside the field's range, in the system's unit. */
export function fieldSchema(field: ToolField, system: UnitSystem) {
  const [min, max] = field.range[system]
  const unit = fieldUnit(field, system)
  const between = `${field.label} must lie between ${min} and ${max}${unit ? ` ${unit}` : ''}`
  let number = z.number().min(min, between).max(max, between)
  if (field.integer) number = number.int(`${field.label} must be a whole number`)
  const text = z.string({ error: `${field.label}: enter a number` }).trim()
  const parsed = z.string().regex(NUMBER_TEXT, `${field.label} must be a number: digits with a decimal point, no commas or letters`)
    .transform(Number).pipe(number)
  if (field.optional) return text.transform(s => (s === '' ? undefined : s)).pipe(parsed.optional())
  return text.min(1, `${field.label}: enter a number`).pipe(parsed)
}

/** A calculator's fields in the system's units, out in the engine module's units. */
export function toolSchema<K extends string>(fields: readonly ToolField<K>[], system: UnitSystem) {
  const shape = Object.fromEntries(fields.map(f => [f.key, fieldSchema(f, system)]))
  return z.object(shape).transform((entered) => {
    const out: Record<string, number | undefined> = {}
    for (const f of fields) {
      const v = entered[f.key] as number | undefined
      if (v === undefined) out[f.key] = undefined
      else if (f.fraction) out[f.key] = v / 100
      else out[f.key] = f.quantity ? toImperial(f.quantity, v, system) : v
    }
    return out as ToolInput<K>
  })
}

/** Text typed in one system's unit, rewritten in the other's; text that is not a number stays as typed. */
export function rewriteValue(field: ToolField, text: string, from: UnitSystem, to: UnitSystem): string {
  const value = Number(text)
  if (!field.quantity || from === to || text.trim() === '' || !NUMBER_TEXT.test(text.trim())) return text
  try {
    return convertBetween(field.quantity, value, from, to).toFixed(field.digits[to])
  }
  catch {
    return text
  }
}

/**
 * The message for an engine-module RangeError, keyed by the field it is about: the module names
 * its argument first ("rodLengthIn must ..."), which is the field's key; otherwise the fallback field.
 */
export function rangeErrorMessage<K extends string>(fields: readonly ToolField<K>[], error: RangeError, fallback: K): Partial<Record<K, string>> {
  const named = fields.find(f => error.message.startsWith(`${f.key} `))
  const out: Partial<Record<K, string>> = {}
  if (named) out[named.key] = `${named.label} ${error.message.slice(named.key.length + 1)}`
  else out[fallback] = `${fields.find(f => f.key === fallback)?.label ?? 'Input'}: ${error.message}`
  return out
}

/** Rod length must exceed half the stroke (else the crank cannot turn); both are lengths in one unit. */
function rodReachesCrank<K extends string>(schema: ReturnType<typeof toolSchema<K>>, fields: readonly ToolField<K>[]) {
  return schema.superRefine((input, ctx) => {
    const v = input as Record<string, number>
    if (v.rodLengthIn! <= v.strokeIn! / 2) {
      const rod = fields.find(f => f.key === 'rodLengthIn')!
      ctx.addIssue({ code: 'custom', path: ['rodLengthIn'], message: `${rod.label} must be longer than half the stroke` })
    }
  })
}

const bore: ToolField<'boreIn'> = { key: 'boreIn', label: 'Bore', quantity: 'length', range: { imperial: [1, 8], metric: [25, 200] }, digits: { imperial: 3, metric: 2 } }
const stroke: ToolField<'strokeIn'> = { key: 'strokeIn', label: 'Stroke', quantity: 'length', range: { imperial: [1, 8], metric: [25, 200] }, digits: { imperial: 3, metric: 2 } }
const rod: ToolField<'rodLengthIn'> = { key: 'rodLengthIn', label: 'Rod length', quantity: 'length', range: { imperial: [2, 12], metric: [50, 300] }, digits: { imperial: 3, metric: 2 }, hint: 'Center to center' }
const rpm: ToolField<'rpm'> = { key: 'rpm', label: 'Engine speed', unit: 'rpm', range: same(100, 20000), digits: both(0) }
const displacement: ToolField<'displacementCi'> = { key: 'displacementCi', label: 'Displacement', quantity: 'displacement', range: { imperial: [10, 1200], metric: [0.2, 20] }, digits: { imperial: 1, metric: 3 } }

export const displacementFields = [
  bore, stroke,
  { key: 'cylinders', label: 'Cylinders', unit: '', range: same(1, 16), digits: both(0), integer: true },
  rod,
] as const satisfies readonly ToolField[]

export const compressionFields = [
  bore, stroke, rod,
  { key: 'chamberCc', label: 'Chamber volume', unit: 'cc', range: same(10, 200), digits: both(1), hint: 'Measured in the head' },
  { key: 'pistonCc', label: 'Piston top volume', unit: 'cc', range: same(-60, 80), digits: both(1), hint: 'Dish and valve reliefs positive, a dome negative' },
  { key: 'gasketBoreIn', label: 'Gasket bore', quantity: 'length', range: { imperial: [1, 8.5], metric: [25, 215] }, digits: { imperial: 3, metric: 2 } },
  { key: 'gasketThicknessIn', label: 'Gasket thickness', quantity: 'length', range: { imperial: [0, 0.25], metric: [0, 6.35] }, digits: { imperial: 3, metric: 3 }, hint: 'Compressed' },
  { key: 'deckClearanceIn', label: 'Deck clearance', quantity: 'length', range: { imperial: [-0.1, 0.2], metric: [-2.5, 5] }, digits: { imperial: 3, metric: 3 }, hint: 'Piston below the deck positive, out of the hole negative' },
  { key: 'intakeClosesAbdcDeg', label: 'Intake closes', unit: '° ABDC', range: same(0, 120), digits: both(1), hint: 'As the cam card gives it, on the basis chosen above' },
] as const satisfies readonly ToolField[]

export const camFields = [
  { key: 'intakeDurationDeg', label: 'Intake duration', unit: '°', range: same(100, 340), digits: both(1), hint: 'Crank degrees, at the lift chosen above' },
  { key: 'exhaustDurationDeg', label: 'Exhaust duration', unit: '°', range: same(100, 340), digits: both(1), hint: 'Crank degrees, at the lift chosen above' },
  { key: 'lobeSeparationDeg', label: 'Lobe separation', unit: '°', range: same(80, 140), digits: both(1), hint: 'Cam degrees' },
  { key: 'intakeCenterlineDeg', label: 'Intake centreline', unit: '° ATDC', range: same(60, 160), digits: both(1), hint: 'As installed' },
] as const satisfies readonly ToolField[]

export const powerFields = [
  { key: 'lbFt', label: 'Torque', quantity: 'torque', range: { imperial: [1, 5000], metric: [1, 6800] }, digits: both(1) },
  rpm, displacement,
] as const satisfies readonly ToolField[]

export const pistonFields = [stroke, rod, rpm] as const satisfies readonly ToolField[]

export const airflowFields = [
  displacement, rpm,
  { key: 'volumetricEfficiency', label: 'Volumetric efficiency', unit: '%', range: same(10, 200), digits: both(0), fraction: true, hint: 'Your estimate: 100 % fills every cylinder once each two turns' },
] as const satisfies readonly ToolField[]

export const fuelFields = [
  { key: 'hp', label: 'Target power', quantity: 'power', range: { imperial: [10, 5000], metric: [7.5, 3700] }, digits: { imperial: 0, metric: 1 }, hint: 'At the crank' },
  { key: 'bsfc', label: 'Fuel use (BSFC)', quantity: 'bsfc', range: { imperial: [0.3, 1.6], metric: [180, 970] }, digits: { imperial: 2, metric: 0 } },
  { key: 'injectors', label: 'Injectors', unit: '', range: same(1, 32), digits: both(0), integer: true },
  { key: 'maxDutyCycle', label: 'Highest duty cycle', unit: '%', range: same(10, 100), digits: both(0), fraction: true, hint: 'Common practice: 80 %' },
] as const satisfies readonly ToolField[]

export const correctionFields = [
  { key: 'baroInHg', label: 'Barometer', quantity: 'barometer', range: { imperial: [20, 32.5], metric: [68, 110] }, digits: { imperial: 2, metric: 1 }, hint: 'Station pressure, not corrected to sea level' },
  { key: 'airTempF', label: 'Air temperature', quantity: 'temperature', range: { imperial: [-20, 130], metric: [-29, 54] }, digits: { imperial: 0, metric: 1 }, hint: 'At the engine\'s air inlet' },
  { key: 'humidityPct', label: 'Relative humidity', unit: '%', range: same(0, 100), digits: both(0) },
  { key: 'observedHp', label: 'Observed power', quantity: 'power', range: { imperial: [1, 5000], metric: [0.75, 3700] }, digits: { imperial: 1, metric: 1 }, optional: true, hint: 'Optional: as read on the dyno' },
] as const satisfies readonly ToolField[]

type KeysOf<F extends readonly ToolField[]> = F[number]['key']
export type DisplacementKey = KeysOf<typeof displacementFields>
export type CompressionKey = KeysOf<typeof compressionFields>

/** One schema per unit system, built on first use and kept: building a zod schema costs far more than parsing with it. */
function perSystem<S>(make: (system: UnitSystem) => S): (system: UnitSystem) => S {
  const made = new Map<UnitSystem, S>()
  return (system) => {
    let schema = made.get(system)
    if (!schema) made.set(system, schema = make(system))
    return schema
  }
}

export const displacementSchema = perSystem(system => rodReachesCrank(toolSchema(displacementFields, system), displacementFields))
export const compressionSchema = perSystem(system => rodReachesCrank(toolSchema(compressionFields, system), compressionFields))
export const camSchema = perSystem(system => toolSchema(camFields, system))
export const powerSchema = perSystem(system => toolSchema(powerFields, system))
export const pistonSchema = perSystem(system => rodReachesCrank(toolSchema(pistonFields, system), pistonFields))
export const airflowSchema = perSystem(system => toolSchema(airflowFields, system))
export const fuelSchema = perSystem(system => toolSchema(fuelFields, system))
export const correctionSchema = perSystem(system => toolSchema(correctionFields, system))

const timingBasisIds = VALVE_TIMING_BASES.map(b => b.id) as [ValveTimingBasis, ...ValveTimingBasis[]]
/** Which lift the cam card quotes its durations and events at (0.050 in, or seat / advertised). */
export const timingBasisSchema = z.enum(timingBasisIds, { error: `Timing basis must be one of ${timingBasisIds.join(', ')}` })

/** How the engine breathes, as far as fuel sizing cares: a power adder burns richer. */
export const POWER_ADDERS = [
  { id: 'none', label: 'None (naturally aspirated)' },
  { id: 'turbo', label: 'Turbocharger' },
  { id: 'supercharged', label: 'Supercharger' },
  { id: 'nitrous', label: 'Nitrous' },
] as const
export type PowerAdder = (typeof POWER_ADDERS)[number]['id']

const fuelKeys = Object.keys(fuelDefaults) as [FuelKey, ...FuelKey[]]
const adderIds = POWER_ADDERS.map(a => a.id) as [PowerAdder, ...PowerAdder[]]

export const fuelChoiceSchema = z.object({
  fuel: z.enum(fuelKeys, { error: `Fuel must be one of ${fuelKeys.join(', ')}` }),
  adder: z.enum(adderIds, { error: `Power adder must be one of ${adderIds.join(', ')}` }),
})

/** The default BSFC, lb/(hp·h), for a fuel with or without a power adder: gasoline's (common practice) scaled by the stoichiometric ratio. */
export function commonBsfc(fuel: FuelKey, adder: PowerAdder): number {
  const d = fuelDefaults[fuel]
  return adder === 'none' ? d.bsfcNa : d.bsfcBoosted
}

/** The standards the correction calculator offers (uncorrected needs no calculator). */
export const CORRECTION_CHOICES = CORRECTION_STANDARDS.filter(s => s.id !== 'UNCORRECTED')
const standardIds = CORRECTION_CHOICES.map(s => s.id) as [Exclude<CorrectionStandard, 'UNCORRECTED'>, ...Exclude<CorrectionStandard, 'UNCORRECTED'>[]]
export const correctionStandardSchema = z.enum(standardIds, { error: `Standard must be one of ${standardIds.join(', ')}` })
