import { promisify } from 'node:util'
import { brotliCompress, constants, gzip } from 'node:zlib'

export type Coding = 'br' | 'gzip'

/** Bodies smaller than this go out as they are: compressing them saves less than its headers cost (common practice, about one TCP packet). */
export const COMPRESS_MIN_BYTES = 1024

/** Content types worth compressing: text, JSON, JavaScript, SVG and XML. */
export function isCompressible(contentType: string | undefined): boolean {
  const type = (contentType ?? '').split(';')[0]!.trim().toLowerCase()
  return type.startsWith('text/') || type === 'application/json' || type.endsWith('+json') || type === 'application/javascript' || type === 'image/svg+xml' || type.endsWith('+xml') || type === 'application/xml'
}

/**
 * The coding to answer with, from an Accept-Encoding header (RFC 9110, 12.5.3): the highest q-value
 * wins, brotli before gzip on a tie, q=0 refuses a coding, and `*` stands for any coding not named.
 * Null when the client accepts neither (then the body goes out uncompressed).
 */
export function pickCoding(acceptEncoding: string | undefined): Coding | null {
  if (!acceptEncoding) return null
  const q = new Map<string, number>()
  for (const part of acceptEncoding.toLowerCase().split(',')) {
    const [name, ...params] = part.trim().split(';')
    if (!name) continue
    const qParam = params.map(p => p.trim()).find(p => p.startsWith('q='))
    const value = qParam ? Number(qParam.slice(2)) : 1
    q.set(name.trim(), Number.isFinite(value) ? value : 0)
  }
  const of = (coding: Coding) => q.get(coding) ?? (coding === 'gzip' ? q.get('x-gzip') : undefined) ?? q.get('*') ?? 0
  const br = of('br')
  const gz = of('gzip')
  if (br <= 0 && gz <= 0) return null
  return br >= gz ? 'br' : 'gzip'
}

const brotli = promisify(brotliCompress)
const gzipAsync = promisify(gzip)

/**
 * Compresses an answer body. Brotli at quality 5 and gzip at level 6: quick enough per request for
 * server-rendered pages (the public assets are compressed once at build time at the highest levels);
 * common practice for on-the-fly compression.
 */
export function compressBody(body: Buffer, coding: Coding): Promise<Buffer> {
  return coding === 'br'
    ? brotli(body, { params: { [constants.BROTLI_PARAM_QUALITY]: 5, [constants.BROTLI_PARAM_SIZE_HINT]: body.length } })
    : gzipAsync(body, { level: 6 })
}
