// Compresses server-rendered pages and JSON answers (gzip or brotli, as the client's Accept-Encoding
// allows; see server/utils/compression.ts). Public assets are compressed once at build time
// (nitro.compressPublicAssets) and served by Nitro's static handler, which sets its own headers.
// Runs on beforeResponse, after nuxt-security has put its nonces, hashes and headers on the page.
export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('beforeResponse', async (event, response) => {
    const res = event.node.res
    if (res.headersSent || event.method === 'HEAD' || res.statusCode === 204 || res.statusCode === 304) return
    // Nuxt renders an error page through an internal request and reads its body as text, copying its
    // headers: that inner answer stays plain (the outer one is the answer the client gets).
    if (event.path.startsWith('/__nuxt_error') || getRequestHeader(event, 'x-nuxt-error')) return
    const body = response.body
    let text: string
    if (typeof body === 'string') {
      text = body
      if (!res.getHeader('content-type')) res.setHeader('content-type', 'text/html')
    }
    else if (body !== null && typeof body === 'object' && (Array.isArray(body) || Object.getPrototypeOf(body) === Object.prototype)) {
      text = JSON.stringify(body)
      if (!res.getHeader('content-type')) res.setHeader('content-type', 'application/json')
    }
    else {
      return
    }
    if (res.getHeader('content-encoding') || !isCompressible(String(res.getHeader('content-type')))) return
    const vary = String(res.getHeader('vary') ?? '')
    if (!/accept-encoding|\*/i.test(vary)) res.setHeader('vary', vary ? `${vary}, Accept-Encoding` : 'Accept-Encoding')
    const raw = Buffer.from(text, 'utf8')
    const coding = raw.length >= COMPRESS_MIN_BYTES ? pickCoding(getRequestHeader(event, 'accept-encoding')) : null
    if (!coding) {
      response.body = text
      return
    }
    response.body = await compressBody(raw, coding)
    res.setHeader('content-encoding', coding)
    res.removeHeader('content-length')
  })
})
