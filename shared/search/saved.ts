// Saved searches on both sides: the stored form of a search's filters, its /search link and a name
// made from it. Pure code; the filters are the validated GET /api/search parameters less sort and page.
import type { SearchFilterParams } from '../schemas/search'

const LIST_KEYS = ['aspiration', 'fuel', 'family', 'use', 'region'] as const
const NUMBER_KEYS = ['ciMin', 'ciMax', 'hpMin', 'hpMax', 'hpTarget', 'hpTolerance', 'tqMin', 'tqMax', 'priceMax', 'bandFrom', 'bandTo'] as const

/** True when the filters narrow anything: words or a filter. The band alone does not (it only adds band power). */
export function hasFilters(f: SearchFilterParams): boolean {
  if (f.q !== undefined && f.q.trim() !== '') return true
  if (f.verified === true) return true
  if (LIST_KEYS.some(k => (f[k]?.length ?? 0) > 0)) return true
  return NUMBER_KEYS.some(k => k !== 'bandFrom' && k !== 'bandTo' && f[k] !== undefined)
}

/** One spelling of the same filters: keys in order, list values sorted once each, blank words and `verified=false` dropped. */
export function canonicalFilters(f: SearchFilterParams): SearchFilterParams {
  const out: SearchFilterParams = {}
  const q = f.q?.trim()
  if (q) out.q = q
  for (const k of NUMBER_KEYS) if (f[k] !== undefined) out[k] = f[k]
  for (const k of LIST_KEYS) {
    const values = f[k]
    if (values?.length) (out as unknown as Record<string, string[]>)[k] = [...new Set(values as string[])].sort()
  }
  if (f.verified === true) out.verified = true
  return Object.fromEntries(Object.entries(out).sort(([a], [b]) => a.localeCompare(b))) as SearchFilterParams
}

/** The filters as URL parameters of the search page (the names GET /api/search reads). */
export function filterParams(f: SearchFilterParams): Record<string, string | string[]> {
  const out: Record<string, string | string[]> = {}
  const c = canonicalFilters(f)
  if (c.q) out.q = c.q
  for (const k of NUMBER_KEYS) if (c[k] !== undefined) out[k] = String(c[k])
  for (const k of LIST_KEYS) if (c[k]?.length) out[k] = [...(c[k] as string[])]
  if (c.verified) out.verified = 'true'
  return out
}

/** The search page opened on these filters. */
export function searchPath(f: SearchFilterParams): string {
  const params = new URLSearchParams()
  for (const [k, v] of Object.entries(filterParams(f))) for (const one of Array.isArray(v) ? v : [v]) params.append(k, one)
  const s = params.toString()
  return s ? `/search?${s}` : '/search'
}

const WORDS: Record<string, string> = {
  na: 'NA', turbo: 'turbo', supercharged: 'supercharged', nitrous: 'nitrous',
  pump_gas: 'pump gas', race_gas: 'race gas', e85: 'E85', methanol: 'methanol',
  drag: 'drag', road_course: 'road course', street_strip: 'street/strip', off_road: 'off-road', marine: 'marine', street: 'street',
}
const n = (v: number) => v.toLocaleString('en-US', { maximumFractionDigits: 1 })

function range(min: number | undefined, max: number | undefined, unit: string): string | null {
  if (min !== undefined && max !== undefined) return `${n(min)}–${n(max)} ${unit}`
  if (min !== undefined) return `${n(min)}+ ${unit}`
  if (max !== undefined) return `up to ${n(max)} ${unit}`
  return null
}

/** A short name made from the filters, e.g. "“billet” · 400–440 ci · 700 hp ± 70 · turbo · E85 · verified". */
export function describeFilters(f: SearchFilterParams, max = 80): string {
  const parts: string[] = []
  const q = f.q?.trim()
  if (q) parts.push(`“${q}”`)
  const ci = range(f.ciMin, f.ciMax, 'ci')
  if (ci) parts.push(ci)
  if (f.hpTarget !== undefined) parts.push(`${n(f.hpTarget)} hp ± ${n(f.hpTolerance ?? Math.round(f.hpTarget * 0.1))}`)
  const hp = range(f.hpMin, f.hpMax, 'hp')
  if (hp) parts.push(hp)
  const tq = range(f.tqMin, f.tqMax, 'lb·ft')
  if (tq) parts.push(tq)
  for (const k of ['aspiration', 'fuel', 'use'] as const) if (f[k]?.length) parts.push(f[k]!.map(v => WORDS[v] ?? v).join(' or '))
  if (f.family?.length) parts.push(f.family.join(' or '))
  if (f.region?.length) parts.push(f.region.join(' or '))
  if (f.priceMax !== undefined) parts.push(`up to $${n(f.priceMax)}`)
  if (f.verified) parts.push('verified')
  const name = parts.join(' · ') || 'All builds'
  return name.length <= max ? name : `${name.slice(0, max - 1).trimEnd()}…`
}
