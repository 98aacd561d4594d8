/**
 * A URL slug from a name: lower-case ASCII letters and digits joined by single hyphens, at most `max`
 * characters. A shop's name spells `&` as "and"; a build's title drops it (`{ ampersand: 'drop' }`),
 * as every published build's address always has.
 */
export function slugify(name: string, max = 120, opts: { ampersand?: 'and' | 'drop' } = {}): string {
  const folded = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
  const slug = (opts.ampersand === 'drop' ? folded : folded.replace(/&/g, ' and '))
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, max)
    .replace(/-+$/g, '')
  return slug
}

/** The first of `base`, `base-2`, `base-3`, … that is not in `taken`. */
export function firstFreeSlug(base: string, taken: ReadonlySet<string>): string {
  if (!taken.has(base)) return base
  for (let n = 2; ; n++) {
    const candidate = `${base}-${n}`
    if (!taken.has(candidate)) return candidate
  }
}
