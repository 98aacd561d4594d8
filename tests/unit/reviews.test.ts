import { describe, expect, it } from 'vitest'
import { MIN_REVIEWS_FOR_AVERAGE, REVIEW_EDIT_DAYS, canEditReview, summariseRatings } from '../../shared/reviews/aspects'
import { combinedScore, compactRecord, hoursText, median, pct, recordScore, succession, type TrackRecord } from '../../shared/reviews/track-record'
import { reviewSchema } from '../../shared/schemas/reviews'

const none = { communication: null, keptToQuote: null, powerVsTarget: null, finishAndPaperwork: null }

describe('summariseRatings', () => {
  it('gives no average below three reviews, and says how many there are', () => {
    const two = summariseRatings([{ rating: 5, aspects: none }, { rating: 1, aspects: none }])
    expect(MIN_REVIEWS_FOR_AVERAGE).toBe(3)
    expect(two.average).toBeNull()
    expect(two.text).toBe('2 reviews — fewer than 3, so no average is shown')
    expect(summariseRatings([]).text).toBe('No reviews yet')
  })

  it('averages three or more to one decimal, each aspect over the reviews that rated it', () => {
    const s = summariseRatings([
      { rating: 5, aspects: { ...none, communication: 4 } },
      { rating: 4, aspects: { ...none, communication: 5 } },
      { rating: 4, aspects: { ...none, communication: 5, keptToQuote: 3 } },
    ])
    // (5 + 4 + 4) / 3 = 4.33…; communication (4 + 5 + 5) / 3 = 4.67…
    expect(s.average).toBe(4.3)
    expect(s.text).toBe('4.3 of 5 from 3 reviews')
    expect(s.aspects.communication).toEqual({ count: 3, average: 4.7 })
    expect(s.aspects.keptToQuote).toEqual({ count: 1, average: null })
  })
})

describe('the edit window', () => {
  it('is open for 14 days to the millisecond and shut after', () => {
    const written = new Date('2026-03-01T10:00:00Z')
    expect(REVIEW_EDIT_DAYS).toBe(14)
    expect(canEditReview(written, new Date('2026-03-15T10:00:00Z'))).toBe(true)
    expect(canEditReview(written, new Date('2026-03-15T10:00:00.001Z'))).toBe(false)
  })
})

describe('reviewSchema', () => {
  it('takes a rating from 1 to 5, optional aspects, and a text of 20 characters or more', () => {
    expect(reviewSchema.parse({ rating: 3, body: ' A fair job, delivered late. ' })).toEqual({ rating: 3, aspects: none, body: 'A fair job, delivered late.', showDeliveryPull: false })
    expect(reviewSchema.safeParse({ rating: 0, body: 'x'.repeat(30) }).success).toBe(false)
    expect(reviewSchema.safeParse({ rating: 4.5, body: 'x'.repeat(30) }).success).toBe(false)
    expect(reviewSchema.safeParse({ rating: 4, body: 'too short' }).success).toBe(false)
    expect(reviewSchema.safeParse({ rating: 4, body: 'x'.repeat(30), aspects: { ...none, speed: 4 } }).success).toBe(false)
  })
})

const empty: TrackRecord = {
  orders: { completed: 0, active: 0, cancelled: 0, total: 0 },
  onTime: { onTime: 0, submitted: 0, sharePct: null },
  guarantees: { met: 0, missed: 0, counted: 0, sharePct: null },
  disputes: { opened: 0, refunded: 0, released: 0, open: 0, ordersWithLoss: 0 },
  firstReply: { medianHours: null, answered: 0, requests: 0 },
  quoteTime: { medianHours: null, quoted: 0, requests: 0 },
}

describe('the record score', () => {
  it('is 50 for a shop without deals', () => {
    expect(recordScore(empty)).toBe(50)
  })

  it('weighs on time 35 %, guarantees 30 %, orders without a lost dispute 20 % and reply speed 15 %', () => {
    const r: TrackRecord = {
      ...empty,
      orders: { completed: 2, active: 0, cancelled: 1, total: 3 },
      onTime: { onTime: 4, submitted: 6, sharePct: 66.7 },
      guarantees: { met: 1, missed: 1, counted: 2, sharePct: 50 },
      disputes: { opened: 3, refunded: 2, released: 1, open: 0, ordersWithLoss: 2 },
      firstReply: { medianHours: 4, answered: 3, requests: 4 },
    }
    // By hand: 0.35 × 5/8 + 0.3 × 2/4 + 0.2 × 2/5 + 0.15 × 1/(1 + 4/24) = 0.21875 + 0.15 + 0.08 + 0.128571… = 0.577321…
    expect(recordScore(r)).toBe(57.7)
  })

  it('lets forty good deals outrank two perfect ones (Laplace\'s rule of succession)', () => {
    expect(succession(2, 2)).toBe(0.75)
    expect(succession(38, 40)).toBeCloseTo(39 / 42, 12)
    const few = { ...empty, onTime: { onTime: 2, submitted: 2, sharePct: 100 } }
    const many = { ...empty, onTime: { onTime: 38, submitted: 40, sharePct: 95 } }
    expect(recordScore(many)).toBeGreaterThan(recordScore(few))
  })

  it('makes a quarter of the for-target score', () => {
    expect(combinedScore(80, 40)).toBe(70)
    expect(combinedScore(0, 100)).toBe(25)
  })
})

describe('record helpers', () => {
  it('takes the middle value, or the mean of the middle two', () => {
    expect(median([])).toBeNull()
    expect(median([40, 2, 4])).toBe(4)
    expect(median([1, 3, 2, 10])).toBe(2.5)
  })

  it('gives shares to one decimal, none from nothing', () => {
    expect(pct(2, 3)).toBe(66.7)
    expect(pct(0, 0)).toBeNull()
  })

  it('words hours and the compact record', () => {
    expect(hoursText(0.5)).toBe('30 min')
    expect(hoursText(17)).toBe('17 h')
    expect(hoursText(60)).toBe('2.5 days')
    expect(hoursText(null)).toBe('—')
    expect(compactRecord({ ...empty, orders: { ...empty.orders, completed: 1, total: 1 }, onTime: { onTime: 3, submitted: 4, sharePct: 75 } })).toBe('1 order completed · 75 % on time (4)')
  })
})
