import { describe, expect, it } from 'vitest'
import { firstLoadAssets } from '../../bench/pages'
import { COMPRESS_MIN_BYTES, compressBody, isCompressible, pickCoding } from '../../server/utils/compression'
import { hasAuthCookie, publicCacheKey } from '../../server/utils/public-cache-keys'
import { brotliDecompressSync, gunzipSync } from 'node:zlib'

describe('pickCoding (Accept-Encoding, RFC 9110 section 12.5.3)', () => {
  it('prefers brotli, takes gzip when brotli is not offered, and nothing without a header', () => {
    expect(pickCoding('gzip, deflate, br')).toBe('br')
    expect(pickCoding('gzip, deflate')).toBe('gzip')
    expect(pickCoding('deflate')).toBeNull()
    expect(pickCoding('identity')).toBeNull()
    expect(pickCoding(undefined)).toBeNull()
    expect(pickCoding('')).toBeNull()
  })

  it('follows q-values: the higher wins, q=0 refuses, * covers codings not named', () => {
    expect(pickCoding('br;q=0.2, gzip;q=0.8')).toBe('gzip')
    expect(pickCoding('br;q=0, gzip')).toBe('gzip')
    expect(pickCoding('br;q=0, gzip;q=0')).toBeNull()
    expect(pickCoding('*')).toBe('br')
    expect(pickCoding('*;q=0.5, br;q=0')).toBe('gzip')
    expect(pickCoding('BR ; Q=1 , GZIP')).toBe('br')
    expect(pickCoding('x-gzip')).toBe('gzip')
  })
})

describe('isCompressible', () => {
  it('takes text, JSON, JavaScript and SVG, and leaves images, fonts and archives alone', () => {
    for (const t of ['text/html;charset=utf-8', 'application/json', 'application/problem+json', 'text/css', 'application/javascript', 'image/svg+xml']) expect(isCompressible(t)).toBe(true)
    for (const t of ['image/png', 'font/woff2', 'application/pdf', 'application/zip', undefined]) expect(isCompressible(t)).toBe(false)
  })
})

describe('compressBody', () => {
  it('round-trips through node:zlib in both codings and shrinks a repetitive page', async () => {
    const body = Buffer.from('<p>Dyno evidence, not dyno-sheet photos.</p>'.repeat(200))
    expect(body.length).toBeGreaterThan(COMPRESS_MIN_BYTES)
    const br = await compressBody(body, 'br')
    const gz = await compressBody(body, 'gzip')
    expect(brotliDecompressSync(br).equals(body)).toBe(true)
    expect(gunzipSync(gz).equals(body)).toBe(true)
    expect(br.length).toBeLessThan(body.length / 10)
  })
})

describe('the public cache keys and bypass', () => {
  it('bypasses on any Auth.js cookie, prefixed or not, and not on other cookies', () => {
    expect(hasAuthCookie('authjs.session-token=abc')).toBe(true)
    expect(hasAuthCookie('theme=dark; __Secure-authjs.session-token=abc')).toBe(true)
    expect(hasAuthCookie('authjs.csrf-token=x')).toBe(true)
    expect(hasAuthCookie('__Host-authjs.csrf-token=x')).toBe(true)
    expect(hasAuthCookie('next-auth.session-token=x')).toBe(true)
    expect(hasAuthCookie('theme=dark')).toBe(false)
    expect(hasAuthCookie('myauthjs.session-token=x')).toBe(false)
    expect(hasAuthCookie(undefined)).toBe(false)
  })

  it('keys on the whole URL and on the generation', () => {
    expect(publicCacheKey('/api/builds?page=1', 3)).toBe(publicCacheKey('/api/builds?page=1', 3))
    expect(publicCacheKey('/api/builds?page=1', 3)).not.toBe(publicCacheKey('/api/builds?page=2', 3))
    expect(publicCacheKey('/api/builds?page=1', 3)).not.toBe(publicCacheKey('/api/builds?page=1', 4))
  })
})

describe('firstLoadAssets (the page bench reads what a first visit loads)', () => {
  it('finds script src, modulepreload and stylesheet links, each once, and leaves fonts and icons out', () => {
    const html = `<html><head>
      <link rel="stylesheet" href="/_nuxt/entry.abc.css" crossorigin>
      <link rel="modulepreload" as="script" crossorigin href="/_nuxt/A.js">
      <link rel="modulepreload" as="script" crossorigin href="/_nuxt/B.js">
      <link rel="preload" as="font" href="/_nuxt/manrope.woff2" crossorigin>
      <link rel="icon" href="/favicon.svg">
      <script type="module" src="/_nuxt/A.js" crossorigin></script>
      <script>window.__state = 1</script></head></html>`
    expect(firstLoadAssets(html)).toEqual({ scripts: ['/_nuxt/A.js', '/_nuxt/B.js'], styles: ['/_nuxt/entry.abc.css'] })
  })
})
