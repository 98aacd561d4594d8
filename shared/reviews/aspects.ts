/**
 * Reviews: the named aspects, how a shop's ratings are summed up, and the edit window. Pure, for the
 * server and the pages alike. The aspects and the three-review floor are Torquewright's own choice.
 */

export const REVIEW_ASPECTS = ['communication', 'keptToQuote', 'powerVsTarget', 'finishAndPaperwork'] as const
export type ReviewAspect = (typeof REVIEW_ASPECTS)[number]

export const REVIEW_ASPECT_LABELS: Record<ReviewAspect, string> = {
  communication: 'Communication',
  keptToQuote: 'Kept to the quote',
  powerVsTarget: 'Delivered power against the target',
  finishAndPaperwork: 'Finish and paperwork',
}

/** A review can be edited this many days after it was written; each edit keeps the version it replaces. */
export const REVIEW_EDIT_DAYS = 14
/** Fewer reviews than this give no average: the summary says how many there are instead. */
export const MIN_REVIEWS_FOR_AVERAGE = 3
export const REVIEW_LIMITS = { bodyChars: 4000, answerChars: 2000 } as const

export interface RatingSummary {
  count: number
  /** Mean overall rating to one decimal, or null below MIN_REVIEWS_FOR_AVERAGE reviews. */
  average: number | null
  /** Per aspect: how many reviews rated it and their mean (null below the floor). */
  aspects: Record<ReviewAspect, { count: number, average: number | null }>
  /** The words the pages show, e.g. "4.3 of 5 from 7 reviews" or "2 reviews — fewer than 3, so no average". */
  text: string
}

const mean = (xs: number[]) => Math.round(10 * xs.reduce((s, x) => s + x, 0) / xs.length) / 10

/** Sums up visible reviews; never averages fewer than MIN_REVIEWS_FOR_AVERAGE. */
export function summariseRatings(list: { rating: number, aspects: Partial<Record<ReviewAspect, number | null>> }[]): RatingSummary {
  const count = list.length
  const average = count >= MIN_REVIEWS_FOR_AVERAGE ? mean(list.map(r => r.rating)) : null
  const aspects = Object.fromEntries(REVIEW_ASPECTS.map((a) => {
    const xs = list.map(r => r.aspects[a]).filter((x): x is number => typeof x === 'number')
    return [a, { count: xs.length, average: xs.length >= MIN_REVIEWS_FOR_AVERAGE ? mean(xs) : null }]
  })) as RatingSummary['aspects']
  const noun = count === 1 ? 'review' : 'reviews'
  const text = count === 0
    ? 'No reviews yet'
    : average === null
      ? `${count} ${noun} — fewer than ${MIN_REVIEWS_FOR_AVERAGE}, so no average is shown`
      : `${average.toFixed(1)} of 5 from ${count} ${noun}`
  return { count, average, aspects, text }
}

/** Whether a review written at `createdAt` may still be edited at `now`. */
export function canEditReview(createdAt: Date, now: Date): boolean {
  return now.getTime() - createdAt.getTime() <= REVIEW_EDIT_DAYS * 86_400_000
}
