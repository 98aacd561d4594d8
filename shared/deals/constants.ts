/** The words and states of a deal, shared by the schema, the server and the pages. */

export const TRANSMISSIONS = ['manual', 'automatic', 'sequential', 'none'] as const

export const TRANSMISSION_LABELS: Record<(typeof TRANSMISSIONS)[number], string> = {
  manual: 'Manual', automatic: 'Automatic (torque converter)', sequential: 'Sequential', none: 'None (engine only / direct drive)',
}

export const MILESTONE_STATES = ['awaiting_payment', 'funded', 'submitted', 'approved', 'released', 'disputed', 'refunded', 'cancelled'] as const
export type MilestoneStateName = (typeof MILESTONE_STATES)[number]

/** How each milestone state reads on the tracker. */
export const MILESTONE_STATE_LABELS: Record<MilestoneStateName, string> = {
  awaiting_payment: 'Deposit due',
  funded: 'Deposit held',
  submitted: 'Work submitted',
  approved: 'Approved, releasing',
  released: 'Paid out to the shop',
  disputed: 'In dispute',
  refunded: 'Refunded',
  cancelled: 'Cancelled',
}

/** A milestone awaiting payment that is not the next one to pay: its deposit is asked for after the one before it. */
export const MILESTONE_NOT_YET_DUE = 'Not yet due'

/** Quote, payment and change-order statuses as people read them (the stored words are for the code). */
export const DEAL_STATUS_LABELS: Record<string, string> = {
  sent: 'Awaiting an answer', accepted: 'Accepted', declined: 'Declined', withdrawn: 'Withdrawn',
  open: 'Started', succeeded: 'Paid', failed: 'Failed', expired: 'Expired',
  proposed: 'Awaiting an answer', active: 'In progress', completed: 'Completed', cancelled: 'Cancelled',
}

/** The milestone states in which money is held by the platform for the racer. */
export const HELD_STATES: readonly MilestoneStateName[] = ['funded', 'submitted', 'disputed']

export const REQUEST_STATUS_LABELS: Record<string, string> = {
  open: 'Waiting for a quote', quoted: 'Quote received', accepted: 'Quote accepted', declined: 'Quote declined', withdrawn: 'Withdrawn',
}

export const ORDER_STATUS_LABELS: Record<string, string> = {
  active: 'In progress', completed: 'Completed', cancelled: 'Cancelled',
}

/** Limits of the forms, shared so the pages and the server refuse the same things. */
export const DEAL_LIMITS = {
  lineItems: 60,
  milestones: 12,
  attachments: 10,
  messageChars: 5000,
  notesChars: 5000,
  minMilestoneCents: 100,
  maxGuaranteeTolerancePct: 10,
} as const

/**
 * Milestones are done in order: a milestone is submitted only once every earlier one is settled —
 * approved, released, refunded or cancelled — so the last one (which approves itself after the set
 * days) can never be handed in while earlier work is untouched or in dispute.
 */
export const SETTLED_MILESTONE_STATES = ['approved', 'released', 'refunded', 'cancelled'] as const

/** The first earlier milestone that still stands in the way of submitting the one at `position`, if any. */
export function blockingMilestone<T extends { position: number, state: string }>(all: readonly T[], position: number): T | null {
  return [...all].sort((a, b) => a.position - b.position)
    .find(m => m.position < position && !(SETTLED_MILESTONE_STATES as readonly string[]).includes(m.state)) ?? null
}
