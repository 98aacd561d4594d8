import { CORRECTION_STANDARDS } from '#shared/engine/types'

/** Display helpers for the deal pages; amounts stay integer cents until formatCents. */
export { formatCents, centsToDecimal, parseMoney } from '#shared/money'

export function standardLabel(id: string | null | undefined): string {
  return CORRECTION_STANDARDS.find(s => s.id === id)?.label ?? (id ?? '—')
}

/** A history line's detail with every standard's stored code written as its name ("SAE J1349 (2004)"). */
export function readableDetail(detail: string): string {
  let out = detail
  for (const s of CORRECTION_STANDARDS) out = out.split(s.id).join(s.label)
  return out
}

const day = new Intl.DateTimeFormat('en-US', { year: 'numeric', month: 'short', day: 'numeric', timeZone: 'UTC' })
const moment = new Intl.DateTimeFormat('en-US', { month: 'short', day: 'numeric', hour: 'numeric', minute: '2-digit' })

/** "Mar 4, 2027" from YYYY-MM-DD or an ISO time. */
export function formatDay(value: string | null | undefined): string {
  if (!value) return '—'
  return day.format(new Date(value.length === 10 ? `${value}T00:00:00Z` : value))
}

/** "Mar 4, 3:15 PM" in the reader's time zone. */
export function formatMoment(value: string | null | undefined): string {
  return value ? moment.format(new Date(value)) : '—'
}

export { formatBytes } from '#shared/uploads'

export { REQUEST_STATUS_LABELS as REQUEST_STATUS_TEXT, MILESTONE_STATE_LABELS as MILESTONE_STATE_TEXT, ORDER_STATUS_LABELS as ORDER_STATUS_TEXT } from '#shared/deals/constants'
