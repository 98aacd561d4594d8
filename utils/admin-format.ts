/** Display helpers for the admin pages. */
import { AUTO_CHECKS } from '#shared/vocabulary'

/** "3 h", "2 days", "just now": how long something has waited. */
export function formatAge(hours: number | null | undefined): string {
  if (hours === null || hours === undefined || Number.isNaN(hours)) return '—'
  if (hours < 1) return `${Math.max(1, Math.round(hours * 60))} min`
  if (hours < 48) return `${Math.round(hours)} h`
  return `${Math.round(hours / 24)} days`
}

/** A date and time in UTC, the same for every admin wherever they sit. */
const when = new Intl.DateTimeFormat('en-US', { year: 'numeric', month: 'short', day: 'numeric', hour: 'numeric', minute: '2-digit', timeZone: 'UTC' })

/** "Mar 4, 2026, 5:06 AM UTC": the deal pages' date style, in UTC so admins in any zone read the same record. */
export function formatWhen(iso: string | null | undefined): string {
  if (!iso) return '—'
  return `${when.format(new Date(iso))} UTC`
}

export function hoursSince(iso: string, now = Date.now()): number {
  return (now - Date.parse(iso)) / 3_600_000
}

/** Each automatic check's name, the same words the shop sees (shared/vocabulary.ts). */
export const CHECK_LABELS: Record<string, string> = AUTO_CHECKS.titles

export const OUTCOME_TONE: Record<string, string> = {
  pass: 'bg-spruce-wash text-spruce',
  warn: 'bg-amber-wash text-amber',
  fail: 'bg-signal-wash text-signal',
}

/** Where a duplicate's other build is seen: its public page while published, else the admin's builds search. */
export function duplicateHref(d: { slug: string, status: string }): string {
  return d.status === 'published' ? `/builds/${d.slug}` : `/admin/listings?q=${encodeURIComponent(d.slug)}`
}

const shown = (v: unknown): string => (v === null || v === undefined ? '—' : typeof v === 'object' ? JSON.stringify(v) : String(v))
const isRecord = (v: unknown): v is Record<string, unknown> => !!v && typeof v === 'object' && !Array.isArray(v)

/** Nested records become dotted keys, so a change inside one reads as a line of its own. */
function flatten(record: Record<string, unknown> | null, prefix = ''): Record<string, unknown> {
  const out: Record<string, unknown> = {}
  for (const [key, value] of Object.entries(record ?? {})) {
    if (isRecord(value)) Object.assign(out, flatten(value, `${prefix}${key}.`))
    else out[`${prefix}${key}`] = value
  }
  return out
}

/** What an audit row changed, key by key: "status: submitted → verified". Keys present on one side only show too. */
export function auditChanges(before: Record<string, unknown> | null, after: Record<string, unknown> | null): { key: string, from: string, to: string }[] {
  const [b, a] = [flatten(before), flatten(after)]
  return [...new Set([...Object.keys(b), ...Object.keys(a)])]
    .map(key => ({ key, from: shown(b[key]), to: shown(a[key]) }))
    .filter(c => c.from !== c.to)
}
