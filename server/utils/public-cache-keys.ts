import { createHash } from 'node:crypto'

// Bumped on every invalidation and part of every key: an answer computed before a change and
// stored after it lands under an old generation that is never read again.
let generation = 0

/** Moves the public cache (server/utils/public-cache.ts) to a new generation of keys. */
export function nextPublicCacheGeneration(): void {
  generation++
}

/** The generation in force: the page cache (server/plugins/page-cache.ts) stores it with each entry. */
export function publicCacheGeneration(): number {
  return generation
}

/** Auth.js cookies (session, CSRF, callback URL) with or without the __Secure-/__Host- prefix. */
const AUTH_COOKIE = /(?:^|;)\s*(?:__Secure-|__Host-)?(?:authjs|next-auth)\.[\w.-]+=/i

/** Whether a request carries any Auth.js cookie: such requests are answered fresh and never stored. */
export function hasAuthCookie(cookieHeader: string | undefined): boolean {
  return !!cookieHeader && AUTH_COOKIE.test(cookieHeader)
}

/** The cache key of a request: the generation and a digest of the whole URL (path and query). */
export function publicCacheKey(url: string, gen = generation): string {
  return `g${gen}_${createHash('sha256').update(url).digest('hex').slice(0, 32)}`
}
