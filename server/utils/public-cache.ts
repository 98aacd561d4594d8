import type { EventHandler, H3Event } from 'h3'
import { hasAuthCookie, nextPublicCacheGeneration, publicCacheKey } from './public-cache-keys'
import { clearPageCache } from './page-cache-rules'

/**
 * Nitro's handler cache for public answers every anonymous visitor gets the same way (published
 * builds, their pages' data). Entries live in this instance's memory for at most PUBLIC_CACHE_SECONDS
 * and are dropped at once when a build changes (server/plugins/public-cache.ts) or a shop renames
 * itself. A request that carries an Auth.js cookie skips the cache both ways. Browsers get
 * `Cache-Control: no-cache` with the ETag, so they revalidate rather than keep a copy.
 */
export const PUBLIC_CACHE_SECONDS = 60
const GROUP = 'public'

/** Drops every cached public answer and page (server/plugins/page-cache.ts); the next request of each is computed again. */
export async function invalidatePublicCache(): Promise<void> {
  nextPublicCacheGeneration()
  clearPageCache()
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
