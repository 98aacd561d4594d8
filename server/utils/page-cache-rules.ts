import { randomBytes } from 'node:crypto'

/**
 * The server-rendered pages every anonymous visitor sees the same way, and how long a rendered copy
 * may be served: the one list the HTML page cache (server/plugins/page-cache.ts) consults. A page
 * whose HTML depends on anything but its URL and the data behind it does not belong here.
 * `query: true` keeps the query string in the key (normalised); the others ignore it for the key
 * and are not cached at all when one is present, so tracking parameters cannot fill the cache.
 */
export const CACHED_PAGES: readonly { pattern: RegExp, seconds: number, query: boolean }[] = [
  { pattern: /^\/$/, seconds: 60, query: false },
  { pattern: /^\/builds\/[\w-]+$/, seconds: 60, query: false },
  // A shop's track record counts deals as they move, which no build-changed hook announces.
  { pattern: /^\/builders\/[\w-]+$/, seconds: 15, query: false },
  { pattern: /^\/search$/, seconds: 60, query: true },
  { pattern: /^\/tools$/, seconds: 60, query: false },
  { pattern: /^\/swaps$/, seconds: 60, query: false },
]

/** Bounds of the cache: entries and bytes of stored HTML, whichever is reached first. */
export const PAGE_CACHE_MAX_ENTRIES = 500
export const PAGE_CACHE_MAX_BYTES = 32 * 1024 * 1024

/** The longest query string a cached search page is keyed on; longer ones are rendered fresh. */
const MAX_QUERY_LENGTH = 512

/**
 * The cache key of a page request, or null when the page is not cached: the host (absolute links
 * may name it), the path, and for pages that read it the query string with its parameters sorted
 * by name (the order of repeated parameters kept), so `?b=1&a=2` and `?a=2&b=1` share one entry.
 */
export function pageCacheKey(host: string, url: string): { key: string, seconds: number } | null {
  const q = url.indexOf('?')
  const path = q < 0 ? url : url.slice(0, q)
  const search = q < 0 ? '' : url.slice(q + 1)
  const page = CACHED_PAGES.find(p => p.pattern.test(path))
  if (!page) return null
  if (!page.query) return search === '' ? { key: `${host} ${path}`, seconds: page.seconds } : null
  if (search.length > MAX_QUERY_LENGTH) return null
  let params: [string, string][]
  try {
    params = [...new URLSearchParams(search)].filter(([k, v]) => k !== '' || v !== '')
  }
  catch {
    return null
  }
  params = params.map((p, i) => [p, i] as const).sort((a, b) => (a[0][0] < b[0][0] ? -1 : a[0][0] > b[0][0] ? 1 : a[1] - b[1])).map(([p]) => p)
  const normal = new URLSearchParams(params).toString()
  return { key: `${host} ${path}${normal ? `?${normal}` : ''}`, seconds: page.seconds }
}

/**
 * Stands in the stored HTML where the answer's nonce was. It carries random bytes of this process,
 * so no text a visitor wrote into a build can spell it and receive the next answer's nonce.
 */
export const NONCE_PLACEHOLDER = `__tw_nonce_${randomBytes(12).toString('hex')}__`

/** A fresh nonce in nuxt-security's form: 18 random bytes in base64 (24 characters). */
export function freshNonce(): string {
  return randomBytes(18).toString('base64')
}

/** One stored page: the finished, uncompressed HTML with the nonce taken out, and its headers. */
export interface CachedPage {
  html: string
  headers: Record<string, string | string[]>
  generation: number
  expires: number
}

/**
 * A least-recently-used store bounded by entries and bytes (a Map keeps insertion order, so its
 * first key is the least recently used one once every read moves its key to the end).
 */
export class PageLru {
  private entries = new Map<string, CachedPage & { size: number }>()
  private bytes = 0

  constructor(private maxEntries = PAGE_CACHE_MAX_ENTRIES, private maxBytes = PAGE_CACHE_MAX_BYTES) {}

  get size(): number {
    return this.entries.size
  }

  get storedBytes(): number {
    return this.bytes
  }

  /** The live entry of a key for this generation at this time, or undefined (a stale one is dropped). */
  get(key: string, generation: number, now: number): CachedPage | undefined {
    const entry = this.entries.get(key)
    if (!entry) return undefined
    this.entries.delete(key)
    if (entry.generation !== generation || entry.expires <= now) {
      this.bytes -= entry.size
      return undefined
    }
    this.entries.set(key, entry)
    return entry
  }

  set(key: string, entry: CachedPage): void {
    const old = this.entries.get(key)
    if (old) {
      this.entries.delete(key)
      this.bytes -= old.size
    }
    const size = Buffer.byteLength(entry.html, 'utf8')
    if (size > this.maxBytes) return
    this.entries.set(key, { ...entry, size })
    this.bytes += size
    for (const [k, e] of this.entries) {
      if (this.entries.size <= this.maxEntries && this.bytes <= this.maxBytes) break
      this.entries.delete(k)
      this.bytes -= e.size
    }
  }

  clear(): void {
    this.entries.clear()
    this.bytes = 0
  }
}

/** This instance's stored pages (server/plugins/page-cache.ts). */
export const pageStore = new PageLru()

/** Drops every stored page; called with every invalidation of the public cache. */
export function clearPageCache(): void {
  pageStore.clear()
}
