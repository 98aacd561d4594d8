import { createHash } from 'node:crypto'
import type { EventHandler, H3Event } from 'h3'

/**
 * Nitro's handler cache for public answers every anonymous visitor gets the same way (published
 * builds, their pages' data). Entries live in this instance's memory for at most PUBLIC_CACHE_SECONDS
 * and are dropped at once when a build changes (server/plugins/public-cache.ts) or a shop renames
 * itself. A request that carries an Auth.js cookie skips the cache both ways. Browsers get
 * `Cache-Control: no-cache` with the ETag, so they revalidate rather than keep a copy.
 */
export const PUBLIC_CACHE_SECONDS = 60
const GROUP = 'public'

// Bumped on every invalidation and part of every key: an answer computed before a change and
// stored after it lands under an old generation that is never read again.
let generation = 0

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

/** Drops every cached public answer; the next request of each is computed again. */
export async function invalidatePublicCache(): Promise<void> {
  generation++
  const storage = useStorage()
  const keys = await storage.getKeys(`cache:${GROUP}`)
  await Promise.all(keys.map(k => storage.removeItem(k)))
}

/** A public GET handler answered from the cache (see above); `name` keeps the routes' entries apart. */
export function definePublicCachedHandler(name: string, handler: EventHandler): EventHandler {
  const cached = defineCachedEventHandler(handler, {
    name,
    group: GROUP,
    maxAge: PUBLIC_CACHE_SECONDS,
    swr: false,
    getKey: (event: H3Event) => publicCacheKey(event.node.req.originalUrl || event.node.req.url || event.path),
    shouldBypassCache: (event: H3Event) => hasAuthCookie(getRequestHeader(event, 'cookie')),
  })
  return defineEventHandler(async (event) => {
    const body = await cached(event)
    if (!event.node.res.headersSent) setResponseHeader(event, 'cache-control', 'no-cache')
    return body
  })
}
