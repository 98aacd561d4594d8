import { createHash, randomUUID } from 'node:crypto'
import type { IncomingMessage } from 'node:http'
import { createError, getRequestHeader, type H3Event } from 'h3'
import { fileTypeFromBuffer } from 'file-type'
import { UPLOAD_LIMITS, type UploadKind, wholeMegabytes as mb } from '../../shared/uploads'

export { UPLOAD_LIMITS, type UploadKind }

/** What each kind may be, by sniffed content (never by the name or the declared type). */
const ALLOWED: Record<UploadKind, string[]> = {
  pull: ['text/csv'],
  sheet: ['image/png', 'image/jpeg', 'image/webp', 'application/pdf'],
  photo: ['image/png', 'image/jpeg', 'image/webp'],
  attachment: ['image/png', 'image/jpeg', 'image/webp', 'application/pdf', 'text/csv'],
  proof: ['image/png', 'image/jpeg', 'image/webp', 'application/pdf', 'text/csv'],
}

/**
 * Routes that read their own request body, each with its own limit: the uploads (UPLOAD_LIMITS, checked
 * by `readUploadForm` / `readLimitedBody` once the caller is known) and the signed webhooks (raw bytes,
 * 1 MB). The body guard (server/middleware/02.request-body.ts) leaves their bodies to them; every other
 * body is held to 1 MB of JSON. A new upload route is added here (a test walks server/api for them).
 */
const OWN_BODY_ROUTES: RegExp[] = [
  /^\/api\/me\/builds\/[^/]+\/photos$/,
  /^\/api\/me\/builds\/[^/]+\/pulls$/,
  /^\/api\/me\/builds\/[^/]+\/pulls\/preview$/,
  /^\/api\/attachments$/,
  /^\/api\/webhooks\//,
]

/** True for a path (without query) whose route reads and limits its own body. */
export function readsOwnBody(path: string): boolean {
  return OWN_BODY_ROUTES.some(r => r.test(path))
}

/** Past the limit, how much more of a refused body is read and thrown away before the connection is closed. */
const DISCARD_BYTES = 16 * 1024 * 1024

/**
 * Reads a request body as it arrives, keeping at most `limit` bytes: past that it resolves null at
 * once, and the rest of the body is read and thrown away (never kept) so the answer reaches the client
 * on an orderly connection; one that keeps sending past DISCARD_BYTES more is cut off. Stopping the
 * stream instead (breaking out of `for await`) destroys the socket under the answer.
 */
export function readBodyUpTo(req: IncomingMessage, limit: number): Promise<Buffer | null> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = []
    let total = 0
    const onData = (chunk: Buffer) => {
      total += chunk.length
      if (total <= limit) {
        chunks.push(chunk)
        return
      }
      req.off('data', onData).off('end', onEnd).off('error', reject)
      let discarded = 0
      req.on('data', (rest: Buffer) => {
        discarded += rest.length
        if (discarded > DISCARD_BYTES) req.socket?.destroy()
      })
      req.on('error', () => {})
      resolve(null)
    }
    const onEnd = () => resolve(Buffer.concat(chunks))
    req.on('data', onData).once('end', onEnd).once('error', reject)
  })
}

/**
 * Reads a request body with a hard byte limit: 413 from Content-Length before reading, and 413 as
 * soon as a chunked body passes the limit (h3 has no limit of its own).
 */
export async function readLimitedBody(event: H3Event, limit: number): Promise<Buffer> {
  const declared = Number(getRequestHeader(event, 'content-length') ?? Number.NaN)
  if (Number.isFinite(declared) && declared > limit) {
    throw createError({ status: 413, message: `The upload is ${mb(declared)}; the most this accepts is ${mb(limit)}.` })
  }
  const body = await readBodyUpTo(event.node.req, limit)
  if (!body) throw createError({ status: 413, message: `The upload is over ${mb(limit)}, the most this accepts.` })
  return body
}

/** True when the bytes are UTF-8 text with no NUL bytes: what a pull file must be. */
function isPlainText(bytes: Buffer): boolean {
  if (bytes.includes(0)) return false
  try {
    new TextDecoder('utf-8', { fatal: true }).decode(bytes)
    return true
  }
  catch {
    return false
  }
}

/** The sniffed MIME type of an upload, or a 415 naming what this kind accepts. */
export async function sniffUpload(kind: UploadKind, bytes: Buffer): Promise<string> {
  const detected = await fileTypeFromBuffer(bytes)
  const mime = detected?.mime ?? (isPlainText(bytes) ? 'text/csv' : 'application/octet-stream')
  if (!ALLOWED[kind].includes(mime)) {
    const wanted = kind === 'pull' ? 'a CSV or tab-separated text file' : ALLOWED[kind].map(m => m.split('/')[1]!.toUpperCase()).join(', ')
    throw createError({ status: 415, message: `That file looks like ${mime === 'application/octet-stream' ? 'binary data' : mime}; this upload takes ${wanted}.` })
  }
  return mime
}

export function sha256(bytes: Buffer): string {
  return createHash('sha256').update(bytes).digest('hex')
}

const EXT: Record<string, string> = { 'text/csv': 'csv', 'image/png': 'png', 'image/jpeg': 'jpg', 'image/webp': 'webp', 'application/pdf': 'pdf' }

/** The key an upload is stored under: its hash plus a random part, so each stored copy has one owner row. */
export function storageKeyFor(kind: UploadKind, hash: string, mime: string): string {
  return `${kind}s/${hash.slice(0, 16)}-${randomUUID()}.${EXT[mime] ?? 'bin'}`
}
