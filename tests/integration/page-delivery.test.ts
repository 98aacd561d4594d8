import { brotliDecompressSync, gunzipSync } from 'node:zlib'
import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { SHOP, PERSONAS, signedIn, type CookieJar } from '../support/auth'
import { baseUrl, schema, testDb } from '../support/context'

// Raw answers: undici's fetch decodes bodies but keeps the Content-Encoding header; asking with an
// explicit Accept-Encoding keeps the negotiation ours. The bytes are decoded here with node:zlib.
async function raw(path: string, acceptEncoding: string, headers: Record<string, string> = {}) {
  const res = await fetch(`${baseUrl()}${path}`, { headers: { 'accept-encoding': acceptEncoding, ...headers }, redirect: 'manual' })
  return { status: res.status, headers: res.headers, text: await res.text() }
}

const varies = (h: Headers) => (h.get('vary') ?? '').toLowerCase().split(',').map(s => s.trim())

let ctx: Awaited<ReturnType<typeof testDb>>
let shop: CookieJar
let build: { id: number, slug: string, title: string }
beforeAll(async () => {
  ctx = await testDb()
  shop = await signedIn(PERSONAS.shop)
  const [row] = await ctx.db.select({ id: schema.builds.id, slug: schema.builds.slug, title: schema.builds.title })
    .from(schema.builds).innerJoin(schema.shops, eq(schema.shops.id, schema.builds.shopId))
    .where(and(eq(schema.shops.slug, SHOP), eq(schema.builds.status, 'published'))).limit(1)
  build = { id: row!.id, slug: row!.slug!, title: row!.title }
})
afterAll(async () => {
  await ctx.db.update(schema.builds).set({ title: build.title }).where(eq(schema.builds.id, build.id))
  // The restore went round the hook: an edit through the API drops what the server cached.
  await fetch(`${baseUrl()}/api/me/builds/${build.id}`, { method: 'PATCH', headers: { 'content-type': 'application/json', 'cookie': shop.header() }, body: JSON.stringify({ title: build.title }) })
  await ctx.close()
})

describe('compressed answers', () => {
  it('sends a server-rendered page as brotli or gzip when asked, varying on Accept-Encoding, and plain when not', async () => {
    const plain = await raw('/', 'identity')
    expect(plain.status).toBe(200)
    expect(plain.headers.get('content-encoding')).toBeNull()
    expect(plain.text).toContain('<html')
    expect(varies(plain.headers)).toContain('accept-encoding')

    const res = await fetch(`${baseUrl()}/`, { headers: { 'accept-encoding': 'br' } })
    expect(res.headers.get('content-encoding')).toBe('br')
    expect(varies(res.headers)).toContain('accept-encoding')
    // fetch decoded it; the decoded page is the same document.
    expect(await res.text()).toContain('<html')

    const gz = await fetch(`${baseUrl()}/`, { headers: { 'accept-encoding': 'gzip' } })
    expect(gz.headers.get('content-encoding')).toBe('gzip')
    expect(gz.headers.get('content-length')).toBeNull()
  })

  it('decodes to the very bytes of the plain answer (brotli and gzip, read raw)', async () => {
    const { request } = await import('node:http')
    const fetchRaw = (path: string, enc: string) => new Promise<{ enc: string | undefined, body: Buffer }>((resolve, reject) => {
      request(`${baseUrl()}${path}`, { headers: { 'accept-encoding': enc } }, (res) => {
        const chunks: Buffer[] = []
        res.on('data', c => chunks.push(c))
        res.on('end', () => resolve({ enc: res.headers['content-encoding'], body: Buffer.concat(chunks) }))
      }).on('error', reject).end()
    })
    const plain = await fetchRaw('/api/builds?perPage=24', 'identity')
    const br = await fetchRaw('/api/builds?perPage=24', 'br;q=1, gzip;q=0.5')
    const gz = await fetchRaw('/api/builds?perPage=24', 'gzip, br;q=0')
    expect(plain.enc).toBeUndefined()
    expect(br.enc).toBe('br')
    expect(gz.enc).toBe('gzip')
    expect(br.body.length).toBeLessThan(plain.body.length)
    expect(brotliDecompressSync(br.body).equals(plain.body)).toBe(true)
    expect(gunzipSync(gz.body).equals(plain.body)).toBe(true)
    expect(JSON.parse(plain.body.toString('utf8')).items.length).toBeGreaterThan(0)
  })

  it('sends an error page whole to a client that accepts brotli: a missing build and a racer on the shop dashboard', async () => {
    const racer = await signedIn(PERSONAS.racer)
    for (const [path, cookie, status] of [['/builds/no-such-build-anywhere', '', 404], ['/dashboard', racer.header(), 403]] as const) {
      // undici decodes by the Content-Encoding header: a body that does not match it fails here.
      const res = await fetch(`${baseUrl()}${path}`, { headers: { 'accept-encoding': 'br, gzip', 'accept': 'text/html', ...(cookie ? { cookie } : {}) }, redirect: 'manual' })
      expect(res.status, path).toBe(status)
      expect(await res.text(), path).toContain('</html>')
    }
  })

  it('sends a missing page\'s error page readable to a client that asks for gzip', async () => {
    const { request } = await import('node:http')
    const res = await new Promise<{ status: number, enc: string | undefined, body: Buffer }>((resolve, reject) => {
      request(`${baseUrl()}/no-such-page-here`, { headers: { 'accept': 'text/html', 'accept-encoding': 'gzip' } }, (r) => {
        const chunks: Buffer[] = []
        r.on('data', c => chunks.push(c))
        r.on('end', () => resolve({ status: r.statusCode!, enc: r.headers['content-encoding'], body: Buffer.concat(chunks) }))
      }).on('error', reject).end()
    })
    expect(res.status).toBe(404)
    const html = res.enc === 'gzip' ? gunzipSync(res.body).toString('utf8') : res.body.toString('utf8')
    expect(res.enc === undefined || res.enc === 'gzip').toBe(true)
    expect(html).toContain('<html')
  })

  it('sends JSON compressed with its JSON type', async () => {
    const res = await raw(`/api/builds/${build.slug}`, 'gzip')
    expect(res.status).toBe(200)
    expect(res.headers.get('content-encoding')).toBe('gzip')
    expect(res.headers.get('content-type')).toMatch(/^application\/json/)
    expect(JSON.parse(res.text).slug).toBe(build.slug)
  })

  it('serves the built scripts and styles pre-compressed, and plain to a client that asks for neither', async () => {
    const html = (await raw('/', 'identity')).text
    const script = /<script[^>]+src="(\/_nuxt\/[^"]+\.js)"/.exec(html)?.[1]
    const style = /<link[^>]+rel="stylesheet"[^>]+href="(\/_nuxt\/[^"]+\.css)"|<link[^>]+href="(\/_nuxt\/[^"]+\.css)"[^>]+rel="stylesheet"/.exec(html)
    expect(script).toBeTruthy()
    for (const path of [script!, (style?.[1] ?? style?.[2])!]) {
      const br = await raw(path, 'gzip, br')
      expect(br.headers.get('content-encoding')).toBe('br')
      expect(varies(br.headers)).toContain('accept-encoding')
      const gz = await raw(path, 'gzip')
      expect(gz.headers.get('content-encoding')).toBe('gzip')
      const plain = await raw(path, 'identity')
      expect(plain.headers.get('content-encoding')).toBeNull()
      expect(gz.text).toBe(plain.text)
    }
  })
})

describe('the public answer cache', () => {
  it('answers anonymous visitors from the cache, signed-in requests fresh, and drops the cache when the build changes', async () => {
    const anonymous = async () => (await raw(`/api/builds/${build.slug}`, 'identity')).text
    const first = JSON.parse(await anonymous())
    expect(first.title).toBe(build.title)

    // A write round the app (straight to MariaDB, no build-changed hook): anonymous visitors still
    // get the cached answer, which shows the cache is in use; a signed-in request reads MariaDB.
    const roundTheApp = `${build.title} (written round the app)`
    await ctx.db.update(schema.builds).set({ title: roundTheApp }).where(eq(schema.builds.id, build.id))
    expect(JSON.parse(await anonymous()).title).toBe(build.title)
    const signedInView = await raw(`/api/builds/${build.slug}`, 'identity', { cookie: shop.header() })
    expect(JSON.parse(signedInView.text).title).toBe(roundTheApp)
    expect(JSON.parse(await anonymous()).title).toBe(build.title)

    // The shop edits the build through the app: the next anonymous answer is the new one at once.
    const edited = `${build.title} (edited)`
    const res = await fetch(`${baseUrl()}/api/me/builds/${build.id}`, { method: 'PATCH', headers: { 'content-type': 'application/json', 'cookie': shop.header() }, body: JSON.stringify({ title: edited }) })
    expect(res.status).toBe(200)
    expect(JSON.parse(await anonymous()).title).toBe(edited)
    const list = JSON.parse((await raw('/api/builds?perPage=100', 'identity')).text) as { items: { slug: string, title: string }[] }
    expect(list.items.find(i => i.slug === build.slug)?.title).toBe(edited)
  })

  it('drops the cache when a shop renames itself: its builds show the new name at once', async () => {
    const shopName = async () => {
      const list = JSON.parse((await raw('/api/builds?perPage=100', 'identity')).text) as { items: { slug: string, shop: { shopName: string } }[] }
      return list.items.find(i => i.slug === build.slug)?.shop.shopName
    }
    const before = await shopName()
    expect(before).toBeTruthy()
    const rename = (name: string) => fetch(`${baseUrl()}/api/builders/${SHOP}`, { method: 'PATCH', headers: { 'content-type': 'application/json', 'cookie': shop.header() }, body: JSON.stringify({ shopName: name }) })
    try {
      expect((await rename(`${before} Renamed`)).status).toBe(200)
      expect(await shopName()).toBe(`${before} Renamed`)
    }
    finally {
      expect((await rename(before!)).status).toBe(200)
    }
    expect(await shopName()).toBe(before)
  })

  it('tells browsers to revalidate rather than keep a copy', async () => {
    const res = await raw(`/api/builds/${build.slug}`, 'identity')
    expect(res.headers.get('cache-control')).toBe('no-cache')
    const etag = res.headers.get('etag')
    expect(etag).toBeTruthy()
    const again = await raw(`/api/builds/${build.slug}`, 'identity', { 'if-none-match': etag! })
    expect(again.status).toBe(304)
  })
})
