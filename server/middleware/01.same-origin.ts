import type { H3Event } from 'h3'

const WRITES = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])

/** The origins a state-changing request may come from: the configured site URL, and the host the request reached. */
function isOwnOrigin(event: H3Event, origin: string): boolean {
  let url: URL
  try {
    url = new URL(origin)
  }
  catch {
    return false // includes "null", sent from sandboxed frames and opaque redirects
  }
  const site = URL.canParse(useRuntimeConfig(event).public.siteUrl) ? new URL(useRuntimeConfig(event).public.siteUrl) : null
  if (site && site.origin === url.origin) return true
  // Without a proxy the Host header is the site's own; a page served from another host cannot name it as its origin.
  const host = getRequestHeader(event, 'host')
  return Boolean(host) && url.host === host
}

/**
 * Refuses cross-site writes to the API (CSRF): a POST/PUT/PATCH/DELETE under /api whose
 * Sec-Fetch-Site says another site, or whose Origin (else Referer) is not the site's own, gets 403
 * before any handler runs. Browsers send Origin on every cross-origin POST and Sec-Fetch-Site on
 * every request (Fetch standard, "append a request Origin header"; W3C Fetch Metadata), so a request
 * carrying neither did not come from a browser form: scripts and the tests pass, as they always could
 * with their own credentials. Webhooks are exempt: they come from the payment service and are
 * verified by their signature. Auth.js's routes get the check too, beside its own CSRF token.
 */
export default defineEventHandler((event) => {
  if (!WRITES.has(event.method)) return
  const path = event.path.split('?')[0]!
  if (!path.startsWith('/api/') || path.startsWith('/api/webhooks/')) return

  const fetchSite = getRequestHeader(event, 'sec-fetch-site')
  const origin = getRequestHeader(event, 'origin') ?? getRequestHeader(event, 'referer')
  const crossSite = fetchSite === 'cross-site' || fetchSite === 'same-site'
  if (crossSite || (origin !== undefined && !isOwnOrigin(event, origin))) {
    throw createError({ status: 403, message: 'This request came from another site and was refused. Open Torquewright itself and try again there.' })
  }
})
