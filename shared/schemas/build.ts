import { z } from 'zod'
import { camEvents } from '../engine/cam'
import { dynamicCompressionRatio, staticCompressionRatio } from '../engine/geometry'
import { ASPIRATIONS, CORRECTION_STANDARD_IDS, FUELS, USES } from '../domain'

/**
 * The build editor's schemas, used by the editor page (field messages as the shop types) and by
 * the server (autosave, publish). The ranges are wide plausibility bounds for engines of this trade
 * (common practice, values from memory): they catch a slipped decimal point, not an unusual build.
 */

export const DYNO_KINDS = ['engine', 'chassis'] as const
export const COMPARISON_ROLES = ['baseline', 'variant'] as const
export const CHANGE_KINDS = ['heads', 'intake', 'camshaft', 'exhaust', 'tune', 'other'] as const

const num = (label: string, min: number, max: number, unit = '') => z.number({ error: `${label} is a number` })
  .refine(Number.isFinite, `${label} is a number`)
  .refine(n => n >= min && n <= max, `${label} is between ${min} and ${max}${unit ? ` ${unit}` : ''}`)
const whole = (label: string, min: number, max: number) => z.number({ error: `${label} is a whole number` })
  .int(`${label} is a whole number`).min(min, `${label} is at least ${min}`).max(max, `${label} is at most ${max}`)
const text = (label: string, min: number, max: number) => z.string({ error: `${label} is text` }).trim()
  .min(min, min <= 1 ? `${label} is required` : `${label} needs at least ${min} characters`)
  .max(max, `${label} is at most ${max} characters`)
// People read these messages in the editor's checklist: no stored codes (pump_gas, e85) in them.
const choice = <T extends readonly [string, ...string[]]>(label: string, values: T) => z.enum(values, { error: `Pick the ${label.toLowerCase()} from the list` })

/** Most a build may ask, in cents (ten million dollars). */
export const MAX_PRICE_CENTS = 1_000_000_000

/** Every combination field with its own bounds; publishing needs them all (injectors stay optional for carburetted builds). */
export const combinationFields = {
  summary: text('The summary', 20, 4000),
  engineFamily: text('The engine family', 2, 60),
  cylinders: whole('Cylinders', 1, 16),
  boreIn: num('Bore', 1.5, 6.5, 'in'),
  strokeIn: num('Stroke', 1.5, 6.5, 'in'),
  rodLengthIn: num('Rod length', 3, 10, 'in'),
  cylinderHeads: text('The cylinder heads', 2, 160),
  chamberCc: num('Chamber volume', 10, 250, 'cc'),
  pistonCc: num('Piston volume', -80, 80, 'cc'),
  gasketBoreIn: num('Gasket bore', 1.5, 7, 'in'),
  gasketThicknessIn: num('Gasket thickness', 0, 0.2, 'in'),
  deckClearanceIn: num('Deck clearance', -0.1, 0.2, 'in'),
  camIntakeDurationDeg: num('Intake duration', 150, 340, '°'),
  camExhaustDurationDeg: num('Exhaust duration', 150, 340, '°'),
  camIntakeLiftIn: num('Intake lift', 0.1, 1.5, 'in'),
  camExhaustLiftIn: num('Exhaust lift', 0.1, 1.5, 'in'),
  camLobeSeparationDeg: num('Lobe separation', 96, 130, '°'),
  camIntakeCenterlineDeg: num('Intake centreline', 90, 130, '°'),
  intakeManifold: text('The intake manifold', 2, 160),
  throttleBody: text('The throttle', 1, 80),
  fuel: choice('Fuel', FUELS),
  aspiration: choice('Aspiration', ASPIRATIONS),
  engineManagement: text('The engine management', 2, 120),
  intendedUse: choice('Intended use', USES),
  priceCents: whole('The price', 0, MAX_PRICE_CENTS),
} as const

export type CombinationField = keyof typeof combinationFields

/** Fields a published build must have (every combination field). */
export const REQUIRED_FOR_PUBLISH = Object.keys(combinationFields) as CombinationField[]

const optionalFields = {
  injectorSizeLbHr: num('Injector size', 10, 600, 'lb/hr').nullable(),
  injectorCount: whole('Injector count', 1, 32).nullable(),
}

export const buildTitle = text('The title', 3, 160)

/** One row of the parts list; prices in integer cents. */
export const partRowSchema = z.object({
  category: text('The category', 1, 60),
  part: text('The part', 1, 200),
  partNumber: z.string().trim().max(80, 'The part number is at most 80 characters').default(''),
  quantity: whole('The quantity', 1, 999),
  unitPriceCents: whole('The unit price', 0, MAX_PRICE_CENTS),
})

export type PartRowInput = z.infer<typeof partRowSchema>

export const MAX_PARTS = 200
export const partsListSchema = z.array(partRowSchema).max(MAX_PARTS, `A parts list has at most ${MAX_PARTS} rows`)

/** The line total and the list total, in integer cents. */
export const lineTotalCents = (row: { quantity: number, unitPriceCents: number }) => row.quantity * row.unitPriceCents
export const partsTotalCents = (rows: { quantity: number, unitPriceCents: number }[]) => rows.reduce((sum, r) => sum + lineTotalCents(r), 0)

type Nullable<T extends Record<string, z.ZodType>> = { [K in keyof T]: z.ZodOptional<z.ZodNullable<T[K]>> }
const nullableAll = <T extends Record<string, z.ZodType>>(shape: T) =>
  Object.fromEntries(Object.entries(shape).map(([k, v]) => [k, v.nullable().optional()])) as Nullable<T>

/**
 * An autosave: any subset of the fields, each checked on its own, null clearing it. A parts list, when
 * sent, replaces the whole list (rows in their order).
 */
export const buildPatch = z.object({
  title: buildTitle.optional(),
  ...nullableAll(combinationFields),
  injectorSizeLbHr: optionalFields.injectorSizeLbHr.optional(),
  injectorCount: optionalFields.injectorCount.optional(),
  parts: partsListSchema.optional(),
}).strict()

export type BuildPatch = z.infer<typeof buildPatch>

export const newBuildSchema = z.object({ title: buildTitle }).strict()

/** Derived figures that make a combination impossible when they fail; each issue names the field to fix. */
function crossChecks(b: z.infer<typeof publishObject>, ctx: z.RefinementCtx) {
  // Zod runs object refinements even when a field failed; the derived figures only mean something once every field is sound.
  if (!publishObject.safeParse(b).success) return
  if (b.rodLengthIn <= b.strokeIn / 2) ctx.addIssue({ code: 'custom', path: ['rodLengthIn'], message: 'The rod must be longer than half the stroke' })
  if ((b.injectorSizeLbHr === null) !== (b.injectorCount === null)) {
    ctx.addIssue({ code: 'custom', path: [b.injectorCount === null ? 'injectorCount' : 'injectorSizeLbHr'], message: 'Give both the injector size and count, or neither for a carburetted build' })
  }
  let cr: number
  try {
    cr = staticCompressionRatio(b)
  }
  catch {
    ctx.addIssue({ code: 'custom', path: ['pistonCc'], message: 'These head, piston, gasket and deck figures leave no room at TDC' })
    return
  }
  if (cr < 5 || cr > 20) ctx.addIssue({ code: 'custom', path: ['chamberCc'], message: `These figures give ${cr.toFixed(1)}:1 static compression; check the chamber, piston and deck volumes` })
  try {
    const ev = camEvents({ intakeDurationDeg: b.camIntakeDurationDeg, exhaustDurationDeg: b.camExhaustDurationDeg, lobeSeparationDeg: b.camLobeSeparationDeg, intakeCenterlineDeg: b.camIntakeCenterlineDeg })
    dynamicCompressionRatio({ ...b, intakeClosesAbdcDeg: ev.intakeClosesAbdcDeg, timingBasis: 'lift050' })
  }
  catch {
    ctx.addIssue({ code: 'custom', path: ['camIntakeCenterlineDeg'], message: 'These cam figures put intake closing outside the stroke; check duration and centreline' })
  }
}

const publishObject = z.object({
  title: buildTitle,
  ...combinationFields,
  injectorSizeLbHr: optionalFields.injectorSizeLbHr,
  injectorCount: optionalFields.injectorCount,
})

/** What a build must hold to be published; the server runs it again over the stored row. */
export const buildPublishSchema = publishObject.superRefine(crossChecks)

export type PublishableBuild = z.infer<typeof buildPublishSchema>

/**
 * Everything that keeps a build from being published, by field: the publish schema's issues, and
 * a pull to show. The editor shows these as the shop types; the server runs the same on publish.
 */
export function publishProblems(fields: Record<string, unknown>, livePulls: number): { path: string, message: string }[] {
  const result = buildPublishSchema.safeParse(fields)
  const missing = (i: z.core.$ZodIssue) => i.code === 'invalid_type' && i.path.length === 1 && (fields[String(i.path[0])] ?? null) === null
  const issues = result.success
    ? []
    : result.error.issues.map(i => ({ path: i.path.join('.'), message: missing(i) ? 'Required to publish' : i.message }))
  if (livePulls === 0) issues.push({ path: 'pulls', message: 'Add at least one dyno pull: a published build shows what it has proven' })
  return issues
}

/** A status change from the editor. */
export const buildStatusAction = z.object({
  action: z.enum(['publish', 'unpublish', 'archive', 'restore'], { error: 'action is publish, unpublish, archive or restore' }),
}).strict()

// ── Dyno evidence ──

const optionalFigure = (label: string, min: number, max: number) => num(label, min, max).nullable().default(null)
const optionalRpm = (label: string) => whole(label, 500, 20_000).nullable().default(null)

/**
 * What the shop says about one pull, sent beside the file. Weather is all three readings or none;
 * a variant says what changed from the baseline.
 */
export const pullMetaSchema = z.object({
  label: text('The label', 2, 120),
  dynoKind: choice('The dyno kind', DYNO_KINDS),
  declaredStandard: z.enum(CORRECTION_STANDARD_IDS, { error: 'Pick the correction standard the dyno sheet used from the list' }),
  declaredFactor: optionalFigure('The correction factor', 0.8, 1.25),
  weather: z.object({
    baroInHg: num('The barometer', 20, 32, 'inHg'),
    airTempF: num('The air temperature', -20, 130, '°F'),
    humidityPct: num('The humidity', 0, 100, '%'),
  }).nullable().default(null),
  declaredPeakHp: optionalFigure('The declared peak power', 1, 10_000),
  declaredPeakHpRpm: optionalRpm('The rpm of declared peak power'),
  declaredPeakTq: optionalFigure('The declared peak torque', 1, 10_000),
  declaredPeakTqRpm: optionalRpm('The rpm of declared peak torque'),
  comparisonRole: choice('The comparison role', COMPARISON_ROLES).nullable().default(null),
  changeKind: choice('What changed', CHANGE_KINDS).nullable().default(null),
  changeNote: z.string().trim().max(200, 'The note on what changed is at most 200 characters').nullable().default(null),
}).strict().superRefine((m, ctx) => {
  if (m.comparisonRole === 'variant' && !m.changeKind) ctx.addIssue({ code: 'custom', path: ['changeKind'], message: 'Say what changed from the baseline' })
  if (m.comparisonRole !== 'variant' && m.changeKind) ctx.addIssue({ code: 'custom', path: ['changeKind'], message: 'Only a variant says what changed' })
})

export type PullMeta = z.infer<typeof pullMetaSchema>
