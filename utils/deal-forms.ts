import type { QuoteRequestInput } from '#shared/schemas/deals'
import { parseMoney } from '#shared/money'

/** The request form as typed (every field text), and how it becomes the route's body. */
export interface TargetFields { targetHp: string, targetTq: string, targetStandard: string, displacementCapCi: string }
/** The transmission and the rpm band it gives (launch or converter stall, then shift), as typed; the class rules and a request share it. */
export interface DriveBandFields { transmission: string, launchRpm: string, stallRpm: string, shiftRpm: string }
export interface DrivetrainFields extends DriveBandFields { fuel: string, aspiration: string, intendedUse: string }
export interface BudgetFields { budgetMin: string, budgetMax: string, deadline: string, title: string, notes: string }

const num = (s: string) => (s.trim() === '' ? null : Number(s.replace(/,/g, '')))

/** The body for POST /api/requests, plus any money field that did not read as an amount. */
export function requestBody(shop: string, build: string | undefined, t: TargetFields, d: DrivetrainFields, b: BudgetFields, attachmentIds: number[]) {
  const errors: Record<string, string> = {}
  const min = parseMoney(b.budgetMin || '0')
  const max = parseMoney(b.budgetMax)
  if (!min.ok) errors.budgetMinCents = min.message
  if (!max.ok) errors.budgetMaxCents = max.message
  const body: Partial<Record<keyof QuoteRequestInput, unknown>> = {
    shop, build, title: b.title, notes: b.notes, deadline: b.deadline || null, attachmentIds,
    targetHp: num(t.targetHp), targetTq: num(t.targetTq), targetStandard: t.targetStandard, displacementCapCi: num(t.displacementCapCi),
    fuel: d.fuel, aspiration: d.aspiration, intendedUse: d.intendedUse, transmission: d.transmission,
    launchRpm: d.transmission === 'automatic' ? null : num(d.launchRpm),
    stallRpm: d.transmission === 'automatic' ? num(d.stallRpm) : null, shiftRpm: num(d.shiftRpm),
    budgetMinCents: min.ok ? min.cents : 0, budgetMaxCents: max.ok ? max.cents : 0,
  }
  return { body, errors }
}

/** zod issues keyed by their first path segment, for showing beside the fields. */
export function issuesByField(issues: { path: PropertyKey[], message: string }[]): Record<string, string> {
  const out: Record<string, string> = {}
  for (const i of issues) {
    const key = String(i.path[0] ?? 'form')
    out[key] ??= i.message
  }
  return out
}

/** One column of a quote's editable rows (components/deal/DealRowsEditor.vue). */
export interface RowColumn<K extends string = string> {
  key: K
  /** The column's heading (and the field's own heading on a phone). */
  heading: string
  /** The field's name before ", line 2". */
  label: string
  /** Grid spans of the field: phone (of 6) and sm up (of 12), as whole class names. */
  cell: string
  /** The heading's span from sm up. */
  head: string
  placeholder?: string
  inputmode?: 'numeric' | 'decimal'
  type?: string
}

export interface LineDraft { category: string, description: string, partNumber: string, quantity: string, unitPrice: string }
export interface MilestoneDraft { title: string, deliverable: string, amount: string, dueDate: string, percent: string }
export interface GuaranteeDraft { enabled: boolean, hp: string, tolerancePct: string, standard: string }
export interface AlternativeDraft {
  enabled: boolean
  boreIn: string
  strokeIn: string
  cylinders: string
  cylinderHeads: string
  camIntakeDurationDeg: string
  camExhaustDurationDeg: string
  camLobeSeparationDeg: string
  camshaft: string
  note: string
}

/** The alternative combination's body (numbers as typed; zod says what is wrong), or null when it is not offered. */
export function alternativeBody(draft: AlternativeDraft) {
  if (!draft.enabled) return null
  const n = (s: string) => (s.trim() === '' ? Number.NaN : Number(s.replace(/,/g, '')))
  return {
    boreIn: n(draft.boreIn), strokeIn: n(draft.strokeIn), cylinders: n(draft.cylinders), cylinderHeads: draft.cylinderHeads,
    camIntakeDurationDeg: n(draft.camIntakeDurationDeg), camExhaustDurationDeg: n(draft.camExhaustDurationDeg),
    camLobeSeparationDeg: n(draft.camLobeSeparationDeg), camshaft: draft.camshaft, note: draft.note,
  }
}

/** Cents of a typed amount, or null while it does not read as one. */
export function draftCents(text: string): number | null {
  const parsed = parseMoney(text)
  return parsed.ok ? parsed.cents : null
}

/** A line's total in cents (quantity × unit price, integers only), or null while either is incomplete. */
export function draftLineTotal(line: LineDraft): number | null {
  const unit = draftCents(line.unitPrice)
  const qty = Number(line.quantity)
  return unit === null || !Number.isInteger(qty) || qty < 1 ? null : unit * qty
}

/** The body for POST /api/requests/:id/quote, or the first thing a person must fix. */
export function quoteBody(lines: LineDraft[], milestones: MilestoneDraft[], guarantee: GuaranteeDraft, validUntil: string, notes: string, alternative?: AlternativeDraft) {
  const errors: Record<string, string> = {}
  const lineItems = lines.map((l, i) => {
    const unit = draftCents(l.unitPrice)
    if (unit === null) errors.lineItems ??= `Line ${i + 1}: the unit price is not an amount.`
    return { category: l.category, description: l.description, partNumber: l.partNumber, quantity: Number(l.quantity), unitPriceCents: unit ?? 0 }
  })
  const plan = milestones.map((m, i) => {
    const amount = draftCents(m.amount)
    if (amount === null) errors.milestones ??= `Milestone ${i + 1}: the amount is not an amount.`
    return { title: m.title, deliverable: m.deliverable, amountCents: amount ?? 0, dueDate: m.dueDate }
  })
  const body = {
    lineItems, milestones: plan, validUntil, notes,
    guarantee: guarantee.enabled ? { hp: Number(guarantee.hp), tolerancePct: Number(guarantee.tolerancePct), standard: guarantee.standard } : null,
    alternative: alternative ? alternativeBody(alternative) : null,
  }
  return { body, errors }
}
