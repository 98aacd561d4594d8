import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import {
  MAX_CENTS, MoneyError, apportion, centsToDecimal, feeCents, formatCents, lineTotalCents, parseMoney,
  percentToBasisPoints, splitByBasisPoints, sumCents,
} from '../../shared/money'

describe('apportion (largest remainder method)', () => {
  // Worked example from infinitelexicon.com's "largest remainder" entry: populations 50, 30, 20 and
  // 7 seats give quotas 3.5, 2.1, 1.4; whole parts 3, 2, 1; the one seat left goes to the largest remainder (0.5).
  it('shares 7 seats among 50, 30 and 20 as 4, 2, 1 (infinitelexicon.com worked example)', () => {
    expect(apportion(7, [50, 30, 20])).toEqual([4, 2, 1])
  })

  // Wikipedia, "Largest remainder method", the 10-seat Hare quota example (figures recalled from
  // memory, re-derived by hand here): quota 10,000; quotas 4.70, 1.60, 1.58, 1.20, 0.61, 0.31;
  // whole parts 4, 1, 1, 1, 0, 0; the three seats left go to remainders 0.70, 0.61 and 0.60.
  it('shares 10 seats by the Hare quota as 5, 2, 1, 1, 1, 0 (Wikipedia example, recalled from memory)', () => {
    expect(apportion(10, [47_000, 16_000, 15_800, 12_000, 6_100, 3_100])).toEqual([5, 2, 1, 1, 1, 0])
  })

  // The Alabama paradox as Wikipedia's article shows it (recalled from memory, re-derived by hand):
  // votes 1500, 1500, 900, 500, 500, 200; with 25 seats D and E get 3 each, with 26 seats only 2.
  it('reproduces the Alabama paradox between 25 and 26 seats (Wikipedia example, recalled from memory)', () => {
    const votes = [1500, 1500, 900, 500, 500, 200]
    expect(apportion(25, votes)).toEqual([7, 7, 4, 3, 3, 1])
    expect(apportion(26, votes)).toEqual([8, 8, 5, 2, 2, 1])
  })

  it('gives equal remainders to the earlier share, so a deposit carries the odd cent', () => {
    expect(apportion(100, [1, 1, 1])).toEqual([34, 33, 33])
    expect(apportion(2, [1, 1, 1])).toEqual([1, 1, 0])
  })

  it('always adds up to the total and keeps each share within a cent of its exact quota', () => {
    fc.assert(fc.property(
      fc.integer({ min: 0, max: MAX_CENTS }),
      fc.array(fc.integer({ min: 0, max: 1_000_000 }), { minLength: 1, maxLength: 12 }).filter(w => w.some(x => x > 0)),
      (total, weights) => {
        const shares = apportion(total, weights)
        expect(shares.reduce((a, b) => a + b, 0)).toBe(total)
        const sum = BigInt(weights.reduce((a, b) => a + b, 0))
        shares.forEach((share, i) => {
          const exactTimesSum = BigInt(total) * BigInt(weights[i]!)
          const floor = exactTimesSum / sum
          // quota rule: the share is the quota rounded down or up
          expect(BigInt(share) === floor || BigInt(share) === floor + 1n).toBe(true)
        })
      },
    ))
  })

  it('refuses weights that add up to zero, negative weights and fractional totals', () => {
    expect(() => apportion(100, [0, 0])).toThrow(MoneyError)
    expect(() => apportion(100, [1, -1])).toThrow(MoneyError)
    expect(() => apportion(10.5, [1, 1])).toThrow(MoneyError)
    expect(() => apportion(10, [])).toThrow(MoneyError)
  })
})

describe('splitByBasisPoints', () => {
  it('splits $1,000.01 by 30 / 40 / 30 % into cents that add up exactly', () => {
    // exact shares 30000.3, 40000.4, 30000.3 → whole parts 30000, 40000, 30000; the cent left goes to the 0.4
    expect(splitByBasisPoints(100_001, [3000, 4000, 3000])).toEqual([30_000, 40_001, 30_000])
  })

  it('splits a total by thirds given as 33.34 / 33.33 / 33.33 %', () => {
    const parts = splitByBasisPoints(1_234_567, [3334, 3333, 3333])
    expect(parts.reduce((a, b) => a + b, 0)).toBe(1_234_567)
    expect(parts).toEqual([411_605, 411_481, 411_481])
  })

  it('refuses percentages that do not add up to 100 %', () => {
    expect(() => splitByBasisPoints(1000, [5000, 4000])).toThrow(/90 %/)
  })
})

describe('percentToBasisPoints', () => {
  it.each([
    ['25', 2500], ['12.5', 1250], ['33.33', 3333], [40, 4000], ['100', 10_000], ['0.01', 1],
  ])('reads %s %% as %i bp', (input, bp) => {
    expect(percentToBasisPoints(input)).toBe(bp)
  })
  it.each(['33.333', '-5', '101', 'ten', ''])('refuses %s', (input) => {
    expect(percentToBasisPoints(input)).toBeNull()
  })
})

describe('feeCents', () => {
  it('takes 5 % (500 bp) of $12,345.67 as $617.28, rounding half up', () => {
    // 1,234,567 × 500 / 10,000 = 61,728.35 → 61,728
    expect(feeCents(1_234_567, 500)).toBe(61_728)
    // 1,000,010 × 500 / 10,000 = 50,000.5 → 50,001 (half up)
    expect(feeCents(1_000_010, 500)).toBe(50_001)
    expect(feeCents(0, 500)).toBe(0)
  })
  it('refuses a rate outside 0–100 %', () => {
    expect(() => feeCents(100, 10_001)).toThrow(MoneyError)
    expect(() => feeCents(100, 2.5)).toThrow(MoneyError)
  })
})

describe('sums and line totals', () => {
  it('adds cents and multiplies a unit price by a quantity', () => {
    expect(sumCents([1999, 1, 50_000])).toBe(52_000)
    expect(lineTotalCents(18_950, 8)).toBe(151_600)
  })
  it('refuses fractional cents, negative amounts, zero quantities and sums past the limit', () => {
    expect(() => sumCents([10.5])).toThrow(MoneyError)
    expect(() => sumCents([-1])).toThrow(MoneyError)
    expect(() => lineTotalCents(100, 0)).toThrow(MoneyError)
    expect(() => sumCents([MAX_CENTS, 1])).toThrow(/limit/)
  })
})

describe('parseMoney and formatting', () => {
  it.each([
    ['1250', 125_000], ['1,250', 125_000], ['$1,250.50', 125_050], ['980.5', 98_050], ['0.07', 7], [' 42 ', 4200], ['12.', 1200],
  ])('reads %s as %i cents', (input, cents) => {
    expect(parseMoney(input)).toEqual({ ok: true, cents })
  })
  it.each([
    ['', 'Enter an amount'], ['-5', 'negative'], ['1.234', 'two digits'], ['12,34', 'not an amount'], ['abc', 'not an amount'], ['99999999999', 'too large'],
  ])('refuses %j with a message (%s)', (input, words) => {
    const result = parseMoney(input)
    expect(result.ok).toBe(false)
    if (!result.ok) expect(result.message).toContain(words)
  })
  it('formats cents without floats, with thousands separators', () => {
    expect(formatCents(123_456_789)).toBe('$1,234,567.89')
    expect(formatCents(5)).toBe('$0.05')
    expect(formatCents(-2550)).toBe('-$25.50')
    expect(formatCents(125_050, { whole: true })).toBe('$1,251')
    expect(formatCents(125_049, { whole: true })).toBe('$1,250')
    expect(centsToDecimal(98_050)).toBe('980.50')
  })
  it('round-trips every amount through its decimal text', () => {
    fc.assert(fc.property(fc.integer({ min: 0, max: MAX_CENTS }), (cents) => {
      expect(parseMoney(centsToDecimal(cents))).toEqual({ ok: true, cents })
    }))
  })
})
