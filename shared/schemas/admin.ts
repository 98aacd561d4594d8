import { z } from 'zod'
import { idSchema, paginationQuery } from './common'

/** Request shapes of the admin routes; the admin pages validate with these same schemas. */

/**
 * Who reads an admin's reason, and what it is for them: a shop fixes its pull or build; the racer
 * whose review is hidden learns why.
 */
export const REASON_READERS = {
  shop: 'so the shop knows what to fix',
  reviewer: 'so the racer who wrote it knows why',
} as const
export type ReasonReader = keyof typeof REASON_READERS

/** A reason the other party will read: long enough to act on, short enough for an e-mail. */
export const reasonSchema = (what: string, reader: ReasonReader) => z.string({ error: `Write ${what}` })
  .trim()
  .min(10, `Write ${what} in a sentence or two (at least 10 characters), ${REASON_READERS[reader]}`)
  .max(2000, 'Keep it under 2,000 characters')

export const approveEvidenceSchema = z.strictObject({
  note: z.string({ error: 'A note is text' }).trim().max(1000, 'Keep the note under 1,000 characters').optional(),
})

export const rejectEvidenceSchema = z.strictObject({
  reason: reasonSchema('what is wrong with the pull', 'shop'),
})

export const unpublishBuildSchema = z.strictObject({
  reason: reasonSchema('why the build comes down', 'shop'),
})

export const DISPUTE_OUTCOMES = ['refund', 'release'] as const

/** An admin's decision on a disputed milestone: where the deposit goes, and a note both parties read. */
export const settleDisputeSchema = z.strictObject({
  outcome: z.enum(DISPUTE_OUTCOMES, { error: 'Settle by refund (to the racer) or release (to the shop)' }),
  note: z.string({ error: 'Write a note to both parties' })
    .trim()
    .min(10, 'Write the note to both parties in a sentence or two (at least 10 characters): it says why the deposit goes where it goes')
    .max(2000, 'Keep the note under 2,000 characters'),
})
export type SettleDisputeInput = z.infer<typeof settleDisputeSchema>

export const BUILD_STATUSES = ['draft', 'published', 'archived'] as const

export const adminBuildsQuery = paginationQuery.extend({
  q: z.string().trim().max(120, 'Search with at most 120 characters').optional(),
  status: z.enum(BUILD_STATUSES, { error: 'status is draft, published or archived' }).optional(),
})

const day = z.iso.date({ error: 'Dates are written YYYY-MM-DD' })

export const auditQuery = paginationQuery.extend({
  action: z.string().trim().max(60).regex(/^[a-z_.]+$/, 'An action looks like pull.verify').optional(),
  entityType: z.string().trim().max(40).regex(/^[a-z_]+$/, 'An entity type looks like dyno_pull').optional(),
  entityId: idSchema.optional(),
  actor: z.string().trim().max(254, 'Search the actor with at most 254 characters').optional(),
  from: day.optional(),
  to: day.optional(),
  perPage: paginationQuery.shape.perPage.default(50),
}).refine(v => !v.from || !v.to || v.from <= v.to, { message: 'The first day comes before the last day', path: ['from'] })

export type AuditQuery = z.infer<typeof auditQuery>
export type AdminBuildsQuery = z.infer<typeof adminBuildsQuery>
