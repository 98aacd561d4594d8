/**
 * Money in integer minor units (cents) only: parsing, formatting, sums, fees and splits that add
 * up exactly. No amount is ever held as a float; where a share is a fraction of a cent, the
 * largest remainder method decides who gets the cent.
 */

/** The one currency the marketplace charges in, as Stripe spells it. */
export const CURRENCY = 'usd'

/** The largest amount any one figure may hold: $10 million, far above any engine deal, well inside 2^53. */
export const MAX_CENTS = 1_000_000_000

export class MoneyError extends RangeError {}

/** Checks that a value is a whole, non-negative number of cents within the limit. */
export function assertCents(name: string, value: number): number {
  if (!Number.isSafeInteger(value)) throw new MoneyError(`${name} must be a whole number of cents, got ${value}`)
  if (value < 0) throw new MoneyError(`${name} cannot be negative, got ${value}`)
  if (value > MAX_CENTS) throw new MoneyError(`${name} is above the limit of ${MAX_CENTS} cents`)
  return value
}

/** The sum of amounts in cents. */
export function sumCents(values: readonly number[]): number {
  let total = 0
  for (const [i, v] of values.entries()) total += assertCents(`amount ${i + 1}`, v)
  return assertCents('the sum', total)
}

/** A line total: unit price times a whole quantity. */
export function lineTotalCents(unitCents: number, quantity: number): number {
  assertCents('the unit price', unitCents)
  if (!Number.isSafeInteger(quantity) || quantity < 1) throw new MoneyError(`the quantity must be a whole number of at least 1, got ${quantity}`)
  return assertCents('the line total', unitCents * quantity)
}

/**
 * Shares `total` in proportion to `weights` by the largest remainder (Hamilton, Hare quota) method:
 * each share is first the whole part of total × weight / Σweights, then the cents left over go one
 * each to the shares with the largest fractional remainders. Equal remainders go to the earlier
 * share. The result always sums to `total` exactly.
 */
export function apportion(total: number, weights: readonly number[]): number[] {
  if (!Number.isSafeInteger(total) || total < 0) throw new MoneyError(`the total must be a whole, non-negative number, got ${total}`)
  if (weights.length === 0) throw new MoneyError('there must be at least one share')
  for (const [i, w] of weights.entries()) {
    if (!Number.isSafeInteger(w) || w < 0) throw new MoneyError(`weight ${i + 1} must be a whole, non-negative number, got ${w}`)
  }
  // BigInt() rather than literals such as 0n: the client bundle's esbuild target predates them.
  const ZERO = BigInt(0)
  const ONE = BigInt(1)
  const sum = weights.reduce((a, w) => a + BigInt(w), ZERO)
  if (sum === ZERO) throw new MoneyError('the weights add up to zero')
  const big = BigInt(total)
  const shares = weights.map((w, index) => {
    const product = big * BigInt(w)
    return { index, whole: product / sum, remainder: product % sum }
  })
  let left = big - shares.reduce((a, s) => a + s.whole, ZERO)
  const byRemainder = [...shares].sort((a, b) => (a.remainder === b.remainder ? a.index - b.index : a.remainder > b.remainder ? -1 : 1))
  for (const s of byRemainder) {
    if (left === ZERO) break
    s.whole += ONE
    left -= ONE
  }
  return shares.map(s => Number(s.whole))
}

/** Basis points in one whole: 100 % = 10,000 bp. */
export const WHOLE_BP = 10_000

/** A percentage with at most two decimals ("12.5", 33.33) as basis points (1250, 3333), or null when it has more. */
export function percentToBasisPoints(percent: number | string): number | null {
  const text = typeof percent === 'number' ? String(percent) : percent.trim()
  const m = text.match(/^(\d{1,3})(?:\.(\d{1,2}))?$/)
  if (!m) return null
  const bp = Number(m[1]) * 100 + Number((m[2] ?? '').padEnd(2, '0'))
  return bp <= WHOLE_BP ? bp : null
}

/** Splits a total by percentages given as basis points that add up to 100 %, cent-exact by largest remainder. */
export function splitByBasisPoints(total: number, basisPoints: readonly number[]): number[] {
  const sum = basisPoints.reduce((a, b) => a + b, 0)
  if (sum !== WHOLE_BP) throw new MoneyError(`the percentages add up to ${sum / 100} %, not 100 %`)
  return apportion(assertCents('the total', total), basisPoints)
}

/** A fee of `bp` basis points on an amount, rounded half up to the cent (integer arithmetic). */
export function feeCents(amount: number, bp: number): number {
  assertCents('the amount', amount)
  if (!Number.isSafeInteger(bp) || bp < 0 || bp > WHOLE_BP) throw new MoneyError(`the fee rate must be 0–10,000 basis points, got ${bp}`)
  const product = BigInt(amount) * BigInt(bp)
  return Number((product + BigInt(WHOLE_BP / 2)) / BigInt(WHOLE_BP))
}

export type ParsedMoney = { ok: true, cents: number } | { ok: false, message: string }

/** Reads an amount a person typed ("1,250", "$1,250.50", "980.5") as cents; refuses more than two decimals. */
export function parseMoney(input: string): ParsedMoney {
  const text = input.trim().replace(/^\$\s*/, '')
  if (text === '') return { ok: false, message: 'Enter an amount.' }
  if (text.startsWith('-')) return { ok: false, message: 'An amount cannot be negative.' }
  const m = text.match(/^(\d{1,3}(?:,\d{3})+|\d+)(?:\.(\d*))?$/)
  if (!m) return { ok: false, message: `"${input.trim()}" is not an amount: use digits, with an optional point and cents (1,250.00).` }
  const fraction = m[2] ?? ''
  if (fraction.length > 2) return { ok: false, message: 'An amount has at most two digits after the point.' }
  const whole = m[1]!.replaceAll(',', '')
  if (whole.length > 10) return { ok: false, message: 'That amount is too large.' }
  const cents = Number(whole) * 100 + Number(fraction.padEnd(2, '0'))
  if (cents > MAX_CENTS) return { ok: false, message: `An amount is at most ${formatCents(MAX_CENTS)}.` }
  return { ok: true, cents }
}

/** Cents as "1234.56", for an input's value. */
export function centsToDecimal(cents: number): string {
  const sign = cents < 0 ? '-' : ''
  const abs = Math.abs(cents)
  const part = abs % 100
  return `${sign}${(abs - part) / 100}.${String(part).padStart(2, '0')}`
}

/** Cents as "$1,234.56" (or "$1,235" with `whole: true`, rounded half up), by integer arithmetic. */
export function formatCents(cents: number, options: { whole?: boolean } = {}): string {
  if (!Number.isSafeInteger(cents)) throw new MoneyError(`not a whole number of cents: ${cents}`)
  const sign = cents < 0 ? '-' : ''
  let abs = Math.abs(cents)
  if (options.whole) abs = abs - (abs % 100) + (abs % 100 >= 50 ? 100 : 0)
  const part = abs % 100
  const dollars = String((abs - part) / 100).replace(/\B(?=(\d{3})+(?!\d))/g, ',')
  return options.whole ? `${sign}$${dollars}` : `${sign}$${dollars}.${String(part).padStart(2, '0')}`
}
