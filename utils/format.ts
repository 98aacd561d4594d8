/** Display helpers shared by the pages; figures stay numbers until the last moment. */
const usd = new Intl.NumberFormat('en-US', { style: 'currency', currency: 'USD', maximumFractionDigits: 0 })

export function formatMoney(cents: number): string {
  return usd.format(cents / 100)
}

/** One formatter per number of digits, made once for the module (a formatter is costly to make, cheap to use). */
const numberFormats = new Map<number, Intl.NumberFormat>()

function numberFormat(digits: number): Intl.NumberFormat {
  let format = numberFormats.get(digits)
  if (!format) {
    format = new Intl.NumberFormat('en-US', { minimumFractionDigits: digits, maximumFractionDigits: digits })
    numberFormats.set(digits, format)
  }
  return format
}

export function formatNumber(value: number | null | undefined, digits = 0): string {
  if (value === null || value === undefined || Number.isNaN(value)) return '—'
  return numberFormat(digits).format(value)
}

export { ASPIRATION_LABELS, FUEL_LABELS, USE_LABELS } from '#shared/domain'
