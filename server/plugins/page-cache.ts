import type { H3Event } from 'h3'
import { hasAuthCookie, publicCacheGeneration } from '../utils/public-cache-keys'
import { NONCE_PLACEHOLDER, freshNonce, pageCacheKey, pageStore } from '../utils/page-cache-rules'

// The HTML page cache: the finished page of an anonymous GET/HEAD of a page in CACHED_PAGES
// (server/utils/page-cache-rules.ts) is kept in this instance's memory, with the answer's CSP nonce
// taken out. A hit puts a fresh nonce into the HTML and into the CSP header and answers without
// rendering. The hooks, in the order Nitro's render handler calls them:
// - `render:before` answers a hit (or marks a miss with its key and the generation in force);
// - `render:response` takes a miss's HTML, as nuxt-security left it (nonces, SRI), before compression,
//   and takes Auth.js's housekeeping cookies off it (see AUTH_HOUSEKEEPING);
// - `beforeResponse` stores it only when the answer is a plain 200 that sets no cookie.
// nuxt-security's own `render:response` hook then puts the same security headers on a hit as on a miss,
// from the CSP rules this plugin fills with the hit's nonce (as its `render:html` hook does on a render).
// Compression (server/plugins/compression.ts) runs on `beforeResponse`, after the nonce is in.
// Entries are dropped with the public API cache's generation (build changes, shop renames, the change
// feed, review writes: invalidatePublicCache) and expire after their page's TTL.

interface PageCacheMark {
  key: string
  seconds: number
  generation: number
  html?: string
  headers?: Record<string, string | string[]>
}

/** Headers that belong to one answer, or that nuxt-security or compression set on every answer themselves. */
const NOT_STORED = new Set(['set-cookie', 'date', 'content-length', 'content-encoding', 'transfer-encoding', 'connection', 'vary', 'content-security-policy', 'etag', 'last-modified'])
const NONCE_TEMPLATE = '\'nonce-{{nonce}}\''

/**
 * Auth.js's housekeeping cookies, which its session route sets on any request without them and
 * sidebase nuxt-auth copies onto every server-rendered page. An anonymous page does not need them:
 * the sign-in forms fetch /api/auth/csrf first (useAccountAuth), which sets both when they are missing.
 */
const AUTH_HOUSEKEEPING = /^\s*(?:__Secure-|__Host-)?authjs\.(?:csrf-token|callback-url)=/i

/** Takes Auth.js's housekeeping cookies off an anonymous page answer, so that it can be stored. */
function dropHousekeepingCookies(event: H3Event): void {
  const res = event.node.res
  const header = res.getHeader('set-cookie')
  if (header === undefined) return
  const lines = (Array.isArray(header) ? header : [String(header)]).filter(line => !AUTH_HOUSEKEEPING.test(line))
  if (lines.length === 0) res.removeHeader('set-cookie')
  else res.setHeader('set-cookie', lines)
}

type SecurityContext = { nonce?: string, rules?: { headers?: { contentSecurityPolicy?: Record<string, unknown> | false } } }

function security(event: H3Event): SecurityContext | undefined {
  return event.context.security as SecurityContext | undefined
}

/** The CSP rules of this request with the template nonce filled in, as nuxt-security's render:html hook does. */
function fillNonce(event: H3Event, nonce: string): boolean {
  const headers = security(event)?.rules?.headers
  const csp = headers?.contentSecurityPolicy
  if (!headers || !csp) return false
  headers.contentSecurityPolicy = Object.fromEntries(Object.entries(csp).map(([directive, value]) => {
    if (typeof value === 'string') return [directive, value.split(' ').map(s => (s === NONCE_TEMPLATE ? `'nonce-${nonce}'` : s)).join(' ')]
    if (Array.isArray(value)) return [directive, value.map(s => (s === NONCE_TEMPLATE ? `'nonce-${nonce}'` : s))]
    return [directive, value]
  }))
  return true
}

export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('render:before', (ctx) => {
    const event = ctx.event
    if (event.method !== 'GET' && event.method !== 'HEAD') return
    if (hasAuthCookie(getRequestHeader(event, 'cookie'))) return
    const rule = pageCacheKey(getRequestHeader(event, 'host') ?? '', event.node.req.originalUrl || event.node.req.url || event.path)
    if (!rule) return
    const generation = publicCacheGeneration()
    const hit = pageStore.get(rule.key, generation, Date.now())
    if (!hit) {
      event.context.pageCache = { key: rule.key, seconds: rule.seconds, generation } satisfies PageCacheMark
      return
    }
    const sec = security(event)
    const nonce = sec?.nonce ?? freshNonce()
    if (!fillNonce(event, nonce)) return
    sec!.nonce = nonce
    for (const [name, value] of Object.entries(hit.headers)) {
      if (name !== 'content-type' && name !== 'x-powered-by') setResponseHeader(event, name, value)
    }
    ctx.response = {
      body: hit.html.replaceAll(NONCE_PLACEHOLDER, nonce),
      statusCode: 200,
      headers: Object.fromEntries(Object.entries(hit.headers).filter(([name]) => name === 'content-type' || name === 'x-powered-by')) as Record<string, string>,
    }
  })

  nitroApp.hooks.hook('render:response', (response, { event }) => {
    const mark = event.context.pageCache as PageCacheMark | undefined
    if (!mark) return
    dropHousekeepingCookies(event)
    const nonce = security(event)?.nonce
    if (!nonce || typeof response.body !== 'string' || (response.statusCode ?? 200) !== 200) return
    if (!response.body.includes(`nonce="${nonce}"`)) return
    const headers: Record<string, string | string[]> = {}
    for (const [name, value] of Object.entries(event.node.res.getHeaders())) {
      if (value !== undefined && !NOT_STORED.has(name)) headers[name] = typeof value === 'number' ? String(value) : value
    }
    for (const [name, value] of Object.entries(response.headers ?? {})) {
      if (!NOT_STORED.has(name.toLowerCase())) headers[name.toLowerCase()] = String(value)
    }
    mark.html = response.body.split(nonce).join(NONCE_PLACEHOLDER)
    mark.headers = headers
  })

  nitroApp.hooks.hook('beforeResponse', (event) => {
    const mark = event.context.pageCache as PageCacheMark | undefined
    if (!mark?.html || !mark.headers) return
    const res = event.node.res
    if (res.statusCode !== 200 || res.getHeader('set-cookie') !== undefined) return
    if (/no-store|private/i.test(String(res.getHeader('cache-control') ?? ''))) return
    pageStore.set(mark.key, { html: mark.html, headers: mark.headers, generation: mark.generation, expires: Date.now() + mark.seconds * 1000 })
  })
})
