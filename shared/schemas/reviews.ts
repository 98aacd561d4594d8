import { z } from 'zod'
import type { REVIEW_ASPECTS } from '../reviews/aspects'
import { REVIEW_LIMITS } from '../reviews/aspects'
import { RECORD_FIGURES } from '../reviews/track-record'
import { reasonSchema } from './admin'
import { slugSchema } from './common'

/** Request bodies of the review routes; the order page's form validates with the same schemas. */

const stars = (what: string) => z.number({ error: `${what} is a whole number from 1 to 5` }).int(`${what} is a whole number from 1 to 5`).min(1, `${what} is at least 1`).max(5, `${what} is at most 5`)
const aspectStars = (what: string) => stars(what).nullable().default(null)

export const reviewAspectsSchema = z.strictObject({
  communication: aspectStars('Communication'),
  keptToQuote: aspectStars('Kept to the quote'),
  powerVsTarget: aspectStars('Delivered power against the target'),
  finishAndPaperwork: aspectStars('Finish and paperwork'),
} satisfies Record<(typeof REVIEW_ASPECTS)[number], unknown>)

export const reviewSchema = z.strictObject({
  rating: stars('The overall rating'),
  aspects: reviewAspectsSchema.default({ communication: null, keptToQuote: null, powerVsTarget: null, finishAndPaperwork: null }),
  body: z.string({ error: 'Write the review' }).trim().min(20, 'The review is at least 20 characters: say what went well or not').max(REVIEW_LIMITS.bodyChars, `The review is at most ${REVIEW_LIMITS.bodyChars} characters`),
  showDeliveryPull: z.boolean({ error: 'showDeliveryPull is true or false' }).default(false),
})
export type ReviewInput = z.infer<typeof reviewSchema>

export const reviewAnswerSchema = z.strictObject({
  body: z.string({ error: 'Write the answer' }).trim().min(1, 'The answer is required').max(REVIEW_LIMITS.answerChars, `The answer is at most ${REVIEW_LIMITS.answerChars} characters`),
})

export const hideReviewSchema = z.strictObject({
  reason: reasonSchema('why the review is hidden', 'reviewer'),
})

export const recordFigureParams = z.object({
  slug: slugSchema,
  figure: z.enum(RECORD_FIGURES, { error: `The figure is one of ${RECORD_FIGURES.join(', ')}` }),
})
