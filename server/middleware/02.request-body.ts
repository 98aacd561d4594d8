import type { H3Event } from 'h3'

/** The most a request body may carry outside the upload routes (common practice for JSON APIs: 1 MB). */
const BODY_LIMIT_BYTES = 1024 * 1024
const BODY_METHODS = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])

/** The media type a route's body must have, without parameters; null where the route checks it itself. */
function expectedType(path: string): string | null {
  if (path.startsWith('/api/webhooks/')) return 'application/json'
  if (readsOwnBody(path)) return null
  // Auth.js reads its sign-in and sign-out posts as HTML forms do.
  if (path.startsWith('/api/auth/')) return 'application/x-www-form-urlencoded'
  if (path.startsWith('/api/')) return 'application/json'
  return null
}

function mediaType(event: H3Event): string {
  return (getRequestHeader(event, 'content-type') ?? '').split(';')[0]!.trim().toLowerCase()
}

function refuseType(expected: string): never {
  throw createError({ status: 415, message: `This route takes ${expected === 'application/json' ? 'a JSON body (Content-Type: application/json)' : `a body of type ${expected}`}.` })
}

const tooLarge = () => createError({ status: 413, message: `The request body is over ${BODY_LIMIT_BYTES / 1024 / 1024} MB, the most this accepts.` })

/**
 * Bounds and types every request body before anything parses it (h3 has no size limit of its own):
 * over 1 MB answers 413, by Content-Length before reading and by counting the bytes of a chunked
 * body; an API body of the wrong type answers 415 (a form post cannot reach a JSON route). The body
 * read here is handed to h3 so `readBody`/`readRawBody` parse these bytes and never the stream again.
 * A request without a body (Content-Length 0, or none and not chunked) passes whatever its type.
 */
export default defineEventHandler(async (event) => {
  // Only these methods carry a body anyone parses (h3's readBody refuses the rest). Nitro's in-process
  // requests (the error page render, server-side $fetch) copy the caller's headers but have no stream.
  if (!BODY_METHODS.has(event.method) || '__unenv__' in event.node.req) return
  const path = event.path.split('?')[0]!
  const declared = Number.parseInt(getRequestHeader(event, 'content-length') ?? '', 10)
  const chunked = /\bchunked\b/i.test(getRequestHeader(event, 'transfer-encoding') ?? '')
  if (!(declared > 0) && !chunked) return

  const expected = expectedType(path)
  if (readsOwnBody(path)) {
    if (expected && mediaType(event) !== expected) refuseType(expected)
    return
  }
  if (declared > BODY_LIMIT_BYTES) throw tooLarge()
  if (expected && declared > 0 && mediaType(event) !== expected) refuseType(expected)

  const body = await readBodyUpTo(event.node.req, BODY_LIMIT_BYTES)
  if (!body) throw tooLarge()
  if (expected && body.length > 0 && mediaType(event) !== expected) refuseType(expected)
  // h3 reads a request's raw body from this symbol when it is set (h3 1.15 readRawBody).
  const req = event.node.req as unknown as Record<symbol, Promise<Buffer>>
  req[Symbol.for('h3RawBody')] = Promise.resolve(body)
})
