import { z } from 'zod'
import { ASPIRATIONS, CORRECTION_STANDARD_IDS, FUELS, USES } from '../domain'
import { DEAL_LIMITS, TRANSMISSIONS } from '../deals/constants'
import { MAX_CENTS, formatCents } from '../money'
import { drivelineRpmFields } from './class-rules'
import { idSchema, slugSchema } from './common'

/** Request bodies of the deal routes; the pages validate their forms with the same schemas. */

export const standardSchema = z.enum(CORRECTION_STANDARD_IDS, { error: 'Pick one of the correction standards in the list' })

const isoDay = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, 'A date is written YYYY-MM-DD').refine(s => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), 'That date does not exist')
const centsSchema = z.number({ error: 'An amount is a whole number of cents' }).int('An amount is a whole number of cents').min(0, 'An amount cannot be negative').max(MAX_CENTS, 'That amount is too large')
const text = (max: number, what: string) => z.string().trim().max(max, `${what} is at most ${max} characters`)
const required = (max: number, what: string) => text(max, what).min(1, `${what} is required`)
const fileIds = z.array(idSchema).max(DEAL_LIMITS.attachments, `At most ${DEAL_LIMITS.attachments} files`).default([])

export const quoteRequestSchema = z.object({
  shop: slugSchema,
  build: slugSchema.optional(),
  title: required(160, 'A title'),
  targetHp: z.number({ error: 'The target power is a number' }).min(50, 'The target power is at least 50 hp').max(5000, 'The target power is at most 5,000 hp'),
  targetTq: z.number({ error: 'The target torque is a number' }).min(50, 'The target torque is at least 50 lb·ft').max(5000, 'The target torque is at most 5,000 lb·ft').nullable().default(null),
  targetStandard: standardSchema,
  displacementCapCi: z.number({ error: 'The displacement cap is a number' }).min(30, 'The displacement cap is at least 30 ci').max(1000, 'The displacement cap is at most 1,000 ci').nullable().default(null),
  fuel: z.enum(FUELS, { error: 'Pick a fuel' }),
  aspiration: z.enum(ASPIRATIONS, { error: 'Pick how the engine breathes' }),
  intendedUse: z.enum(USES, { error: 'Pick the use' }),
  transmission: z.enum(TRANSMISSIONS, { error: 'Pick a transmission' }),
  ...drivelineRpmFields,
  budgetMinCents: centsSchema,
  budgetMaxCents: centsSchema,
  deadline: isoDay.nullable().default(null),
  notes: text(DEAL_LIMITS.notesChars, 'The notes').default(''),
  attachmentIds: fileIds,
}).superRefine((v, ctx) => {
  if (v.budgetMaxCents < v.budgetMinCents) ctx.addIssue({ code: 'custom', path: ['budgetMaxCents'], message: 'The top of the budget is below its bottom' })
  if (v.budgetMaxCents === 0) ctx.addIssue({ code: 'custom', path: ['budgetMaxCents'], message: 'Give the top of your budget' })
  if (v.transmission === 'automatic' && v.stallRpm === null) ctx.addIssue({ code: 'custom', path: ['stallRpm'], message: 'With an automatic, give the converter stall speed' })
  if (v.transmission !== 'automatic' && v.stallRpm !== null) ctx.addIssue({ code: 'custom', path: ['stallRpm'], message: 'A stall speed applies to an automatic only' })
  if (v.stallRpm !== null && v.shiftRpm !== null && v.shiftRpm <= v.stallRpm) ctx.addIssue({ code: 'custom', path: ['shiftRpm'], message: 'The shift rpm must be above the stall speed' })
  if (v.transmission === 'automatic' && v.launchRpm !== null) ctx.addIssue({ code: 'custom', path: ['launchRpm'], message: 'With an automatic, the converter stall speed is the launch' })
  if (v.launchRpm !== null && v.shiftRpm !== null && v.shiftRpm <= v.launchRpm) ctx.addIssue({ code: 'custom', path: ['shiftRpm'], message: 'The shift rpm must be above the launch rpm' })
})
export type QuoteRequestInput = z.infer<typeof quoteRequestSchema>

export const messageSchema = z.object({
  body: text(DEAL_LIMITS.messageChars, 'A message').default(''),
  attachmentIds: fileIds,
}).refine(v => v.body.length > 0 || v.attachmentIds.length > 0, { message: 'Write a message or attach a file', path: ['body'] })
export type MessageInput = z.infer<typeof messageSchema>

export const messagesQuery = z.object({
  after: z.coerce.number().int('after is a message id').min(0, 'after is a message id').default(0),
})

export const lineItemSchema = z.object({
  category: required(60, 'A category'),
  description: required(200, 'A description'),
  partNumber: text(80, 'A part number').default(''),
  quantity: z.number({ error: 'A quantity is a whole number' }).int('A quantity is a whole number').min(1, 'A quantity is at least 1').max(1000, 'A quantity is at most 1,000'),
  unitPriceCents: centsSchema,
})

export const quoteMilestoneSchema = z.object({
  title: required(120, 'A milestone title'),
  deliverable: required(2000, 'What is delivered'),
  amountCents: centsSchema.min(DEAL_LIMITS.minMilestoneCents, 'A milestone is at least $1.00'),
  dueDate: isoDay,
})

export const guaranteeSchema = z.object({
  hp: z.number({ error: 'The guaranteed power is a number' }).min(50, 'The guaranteed power is at least 50 hp').max(5000, 'The guaranteed power is at most 5,000 hp'),
  tolerancePct: z.number({ error: 'The tolerance is a percentage' }).min(0, 'The tolerance cannot be negative').max(DEAL_LIMITS.maxGuaranteeTolerancePct, `The tolerance is at most ${DEAL_LIMITS.maxGuaranteeTolerancePct} %`),
  standard: standardSchema,
})

/** The words every refusal of a quote above the money limit uses, on the page and from the server. */
export const QUOTE_LIMIT_MESSAGE = `A quote's total is at most ${formatCents(MAX_CENTS)}, the limit of any one amount on Torquewright`

/**
 * Where a well-formed quote goes over the money limit: a line total (price × quantity), the sum of the
 * line items or the sum of the milestones above MAX_CENTS. Null when every figure is inside it.
 */
export function quoteLimitIssue(input: { lineItems: { unitPriceCents: number, quantity: number }[], milestones: { amountCents: number }[] }): { path: (string | number)[], message: string } | null {
  let total = 0
  for (const [i, l] of input.lineItems.entries()) {
    const line = l.unitPriceCents * l.quantity
    if (line > MAX_CENTS) return { path: ['lineItems', i, 'quantity'], message: `${QUOTE_LIMIT_MESSAGE}; this line comes to ${formatCents(line)}` }
    total += line
  }
  if (total > MAX_CENTS) return { path: ['lineItems'], message: `${QUOTE_LIMIT_MESSAGE}; the line items come to ${formatCents(total)}` }
  const planned = input.milestones.reduce((a, m) => a + m.amountCents, 0)
  if (planned > MAX_CENTS) return { path: ['milestones'], message: `${QUOTE_LIMIT_MESSAGE}; the milestones come to ${formatCents(planned)}` }
  return null
}

const bounded = (label: string, min: number, max: number, unit: string) => z.number({ error: `${label} is a number` })
  .refine(Number.isFinite, `${label} is a number`)
  .refine(n => n >= min && n <= max, `${label} is between ${min} and ${max} ${unit}`)

/**
 * Another combination a shop offers beside a quote's line items. Bore, stroke and cylinders carry
 * the build editor's bounds (shared/schemas/build.ts); the displacement is always computed from
 * them with shared/engine, never typed. Cam durations are at 0.050 in lift.
 */
export const alternativeSchema = z.object({
  boreIn: bounded('The bore', 1.5, 6.5, 'in'),
  strokeIn: bounded('The stroke', 1.5, 6.5, 'in'),
  cylinders: z.number({ error: 'Cylinders is a whole number' }).int('Cylinders is a whole number').min(1, 'Cylinders is at least 1').max(16, 'Cylinders is at most 16'),
  cylinderHeads: required(160, 'The cylinder heads'),
  camIntakeDurationDeg: bounded('The intake duration', 150, 340, '°'),
  camExhaustDurationDeg: bounded('The exhaust duration', 150, 340, '°'),
  camLobeSeparationDeg: bounded('The lobe separation', 96, 130, '°'),
  camshaft: required(160, 'The camshaft'),
  note: text(500, 'The note').default(''),
})
/** Bore, stroke and cylinders of an alternative: what the composer needs to show its displacement. */
export const alternativeGeometrySchema = alternativeSchema.pick({ boreIn: true, strokeIn: true, cylinders: true })
export type QuoteAlternative = z.infer<typeof alternativeSchema>

/** A quote's fields one by one. The route reads these; the money limit over the whole is the service's 422. */
export const quoteFieldsSchema = z.object({
  lineItems: z.array(lineItemSchema).min(1, 'A quote has at least one line item').max(DEAL_LIMITS.lineItems, `At most ${DEAL_LIMITS.lineItems} line items`),
  milestones: z.array(quoteMilestoneSchema).min(1, 'A quote has at least one milestone').max(DEAL_LIMITS.milestones, `At most ${DEAL_LIMITS.milestones} milestones`),
  validUntil: isoDay,
  notes: text(DEAL_LIMITS.notesChars, 'The notes').default(''),
  guarantee: guaranteeSchema.nullable().default(null),
  alternative: alternativeSchema.nullable().default(null),
})

/** A whole quote as the editor checks it before sending: its fields, and its total inside the money limit. */
export const quoteSchema = quoteFieldsSchema.superRefine((v, ctx) => {
  const issue = quoteLimitIssue(v)
  if (issue) ctx.addIssue({ code: 'custom', path: issue.path, message: issue.message })
})
export type QuoteInput = z.infer<typeof quoteFieldsSchema>

export const acceptQuoteSchema = z.object({
  revision: z.number({ error: 'Say which revision you accept' }).int().min(1),
})

export const declineQuoteSchema = z.object({
  reason: text(1000, 'The reason').default(''),
})

/**
 * A change order after a refunded milestone: the milestones that replace the ones still awaiting
 * payment, adding up to the stated total to the cent, with optional line items that total the same.
 * The sums are the service's 422 (money that does not add up), not a 400.
 */
export const changeOrderSchema = z.object({
  totalCents: centsSchema.min(DEAL_LIMITS.minMilestoneCents, 'The rest of the order is at least $1.00'),
  milestones: z.array(quoteMilestoneSchema).min(1, 'A change order has at least one milestone').max(DEAL_LIMITS.milestones, `At most ${DEAL_LIMITS.milestones} milestones`),
  lineItems: z.array(lineItemSchema).max(DEAL_LIMITS.lineItems, `At most ${DEAL_LIMITS.lineItems} line items`).default([]),
  notes: text(DEAL_LIMITS.notesChars, 'The notes').default(''),
})
export type ChangeOrderInput = z.infer<typeof changeOrderSchema>

export const changeOrderParams = z.object({
  id: idSchema,
  changeId: idSchema,
})

export const submitMilestoneSchema = z.object({
  notes: required(DEAL_LIMITS.notesChars, 'A note on what was done'),
  proofFileIds: fileIds,
  deliveryPullId: idSchema.nullable().default(null),
})
export type SubmitMilestoneInput = z.infer<typeof submitMilestoneSchema>

export const disputeSchema = z.object({
  reason: required(2000, 'The reason for the dispute'),
})

export const cancelOrderSchema = z.object({
  reason: required(1000, 'The reason for canceling'),
})

/** The fields sent with a delivery pull's file (multipart form values arrive as text). */
export const deliveryPullFieldsSchema = z.object({
  declaredStandard: standardSchema,
  baroInHg: z.coerce.number({ error: 'The barometer is a number' }).min(20, 'The barometer reading is at least 20 inHg').max(32, 'The barometer reading is at most 32 inHg'),
  airTempF: z.coerce.number({ error: 'The air temperature is a number' }).min(-20, 'The air temperature is at least -20 °F').max(130, 'The air temperature is at most 130 °F'),
  humidityPct: z.coerce.number({ error: 'The humidity is a number' }).min(0, 'The humidity is at least 0 %').max(100, 'The humidity is at most 100 %'),
  boreIn: z.coerce.number({ error: 'The bore is a number' }).min(2, 'The bore is at least 2 in').max(6, 'The bore is at most 6 in'),
  strokeIn: z.coerce.number({ error: 'The stroke is a number' }).min(2, 'The stroke is at least 2 in').max(6, 'The stroke is at most 6 in'),
  cylinders: z.coerce.number({ error: 'The cylinder count is a number' }).int('The cylinder count is a whole number').min(1).max(16, 'At most 16 cylinders'),
})
export type DeliveryPullFields = z.infer<typeof deliveryPullFieldsSchema>

export const uploadQuery = z.object({
  kind: z.enum(['attachment', 'photo', 'proof', 'pull'], { error: 'kind is attachment, photo, proof or pull' }),
  name: z.string().trim().min(1, 'name is the file\'s name').max(255, 'name is at most 255 characters'),
})

export const deliveryPullSchema = deliveryPullFieldsSchema.extend({ fileId: idSchema })
