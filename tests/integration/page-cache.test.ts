// The HTML page cache (server/plugins/page-cache.ts): anonymous visitors of the public pages get a
// stored copy with a fresh CSP nonce each time; signed-in requests and answers that set a cookie
// never touch it; a build edit and a review write show at once. The cache is proven in use without
// timing: a write straight to MariaDB (round the app, no hook) stays unseen by anonymous visitors
// until a write through the app drops the cache. The shop page is the witness: its data route is
// not in the public API cache, so only the page cache can hide such a write.
import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { pastDeal } from '../../scripts/lib/seed-reviews'
import { SHOP, PERSONAS, signedIn, type CookieJar } from '../support/auth'
import { baseUrl } from '../support/context'
import { dealHttp, dealTestContext, makeOrder, schema, signedInParties, type DealParty } from '../support/deals'

let t: Awaited<ReturnType<typeof dealTestContext>>
let shop: CookieJar
let jars: Record<DealParty, CookieJar>
let build: { id: number, slug: string, title: string }
const DAY = 86_400_000

async function page(path: string, headers: Record<string, string> = {}) {
  const res = await fetch(`${baseUrl()}${path}`, { headers: { 'accept-encoding': 'identity', ...headers }, redirect: 'manual' })
  return { status: res.status, headers: res.headers, html: await res.text() }
}

/** The API edit the build editor makes: it runs the build-changed hook, which drops the caches. */
async function editTitle(title: string) {
  const res = await fetch(`${baseUrl()}/api/me/builds/${build.id}`, { method: 'PATCH', headers: { 'content-type': 'application/json', 'cookie': shop.header() }, body: JSON.stringify({ title }) })
  expect(res.status).toBe(200)
}
const writeRoundTheApp = (title: string) => t.db.update(schema.builds).set({ title }).where(eq(schema.builds.id, build.id))
const SHOP_PAGE = `/builders/${SHOP}`
let shopName: string
const nameRoundTheApp = (name: string) => t.db.update(schema.shops).set({ shopName: name }).where(eq(schema.shops.slug, SHOP))
/** The shop's own rename through the API, which drops the caches. */
async function rename(name: string) {
  const res = await fetch(`${baseUrl()}/api/builders/${SHOP}`, { method: 'PATCH', headers: { 'content-type': 'application/json', 'cookie': shop.header() }, body: JSON.stringify({ shopName: name }) })
  expect(res.status).toBe(200)
}

/** The nonce of the CSP header's script-src and every nonce attribute in the HTML. */
function nonces(res: { headers: Headers, html: string }) {
  const header = /script-src [^;]*'nonce-([^']+)'/.exec(res.headers.get('content-security-policy') ?? '')?.[1]
  const inHtml = [...res.html.matchAll(/<(?:script|link|style)\b[^>]*\bnonce="([^"]+)"/g)].map(m => m[1])
  return { header, inHtml }
}

beforeAll(async () => {
  t = await dealTestContext()
  shop = await signedIn(PERSONAS.shop)
  jars = await signedInParties()
  const [row] = await t.db.select({ id: schema.builds.id, slug: schema.builds.slug, title: schema.builds.title })
    .from(schema.builds).innerJoin(schema.shops, eq(schema.shops.id, schema.builds.shopId))
    .where(and(eq(schema.shops.slug, SHOP), eq(schema.builds.status, 'published'))).limit(1)
  build = { id: row!.id, slug: row!.slug!, title: row!.title }
  const [shopRow] = await t.db.select({ shopName: schema.shops.shopName }).from(schema.shops).where(eq(schema.shops.slug, SHOP))
  shopName = shopRow!.shopName
})
afterAll(async () => {
  await nameRoundTheApp(shopName)
  await rename(shopName)
  await writeRoundTheApp(build.title)
  await editTitle(build.title)
  await t.close()
})

describe('the HTML page cache', () => {
  it('serves a second anonymous visit from the cache; a signed-in request neither gets nor stores a cached page; an edit through the API shows at once', async () => {
    await rename(`${shopName} A`)
    // Signed in first, after the rename dropped the cache: its page must not be stored for anonymous visitors.
    expect((await page(SHOP_PAGE, { cookie: shop.header() })).html).toContain(`${shopName} A`)
    // The rename also went to the change feed, which this instance reads too (every 250 ms by default) and
    // which drops the cache once more: let a few reads pass before the cache is put to the test.
    await new Promise(resolve => setTimeout(resolve, 2000))
    await nameRoundTheApp(`${shopName} B`)
    const first = await page(SHOP_PAGE)
    expect(first.status).toBe(200)
    expect(first.html).toContain(`${shopName} B`)

    await nameRoundTheApp(`${shopName} C`)
    const second = await page(SHOP_PAGE)
    expect(second.html).toContain(`${shopName} B`)
    expect(second.html).not.toContain(`${shopName} C`)
    expect((await page(SHOP_PAGE, { cookie: shop.header() })).html).toContain(`${shopName} C`)
    expect((await page(SHOP_PAGE)).html).toContain(`${shopName} B`)

    // HEAD of a cached page answers like GET, with its own nonce.
    const head = await fetch(`${baseUrl()}${SHOP_PAGE}`, { method: 'HEAD', headers: { 'accept-encoding': 'identity' } })
    expect(head.status).toBe(200)
    expect(head.headers.get('content-security-policy')).toMatch(/'nonce-/)

    // A build edit runs the build-changed hook: the shop page, which lists the build, is rendered afresh.
    await editTitle(`${build.title} (edited)`)
    const fresh = await page(SHOP_PAGE)
    expect(fresh.html).toContain(`${shopName} C`)
    expect(fresh.html).toContain(`${build.title} (edited)`)
    expect((await page(`/builds/${build.slug}`)).html).toContain(`${build.title} (edited)`)
  })

  it('puts a fresh nonce in every answer: the CSP header\'s nonce is the one on every script, and no two answers share one', async () => {
    const path = `/search?ciMax=450&ciMin=400&q=page-cache-${Date.now()}`
    const seen = new Set<string>()
    for (let i = 0; i < 3; i++) {
      const res = await page(path)
      expect(res.status).toBe(200)
      const { header, inHtml } = nonces(res)
      // nuxt-security's form (its generateRandomNonce): 18 random bytes in base64.
      expect(header).toMatch(/^[A-Za-z0-9+/]{24}$/)
      expect(inHtml.length).toBeGreaterThan(1)
      expect(new Set(inHtml)).toEqual(new Set([header]))
      expect(res.html).not.toMatch(/__tw_nonce_/)
      seen.add(header!)
    }
    expect(seen.size).toBe(3)
  })

  it('gives a hit the same headers as a miss, but for the nonce and the date', async () => {
    const path = `/search?q=headers-${Date.now()}`
    const miss = await page(path)
    const hit = await page(path)
    const shape = (res: { headers: Headers }) => {
      const { header } = nonces({ headers: res.headers, html: '' })
      return [...res.headers.entries()].filter(([name]) => name !== 'date')
        .map(([name, value]) => [name, name === 'content-security-policy' ? value.replace(header!, 'N') : value])
    }
    expect(nonces(miss).header).not.toBe(nonces(hit).header)
    expect(shape(hit)).toEqual(shape(miss))
    expect(hit.headers.get('x-frame-options')).toBe('DENY')
    expect(hit.headers.get('x-powered-by')).toBeNull()
    // Compressed after the nonce went in: a gzip hit decodes to a page with its own fresh nonce.
    const gz = await fetch(`${baseUrl()}${path}`, { headers: { 'accept-encoding': 'gzip' } })
    expect(gz.headers.get('content-encoding')).toBe('gzip')
    const gzNonces = nonces({ headers: gz.headers, html: await gz.text() })
    expect(new Set(gzNonces.inHtml)).toEqual(new Set([gzNonces.header]))
    expect(gzNonces.header).not.toBe(nonces(hit).header)
  })

  it('shows a build edit on a cached search page at once', async () => {
    const word = `Zq${Date.now().toString(36)}`
    const path = `/search?q=${word}`
    expect((await page(path)).html).not.toContain(`${build.title} ${word}`)
    expect((await page(path)).html).not.toContain(`${build.title} ${word}`)
    await editTitle(`${build.title} ${word}`)
    expect((await page(path)).html).toContain(`${build.title} ${word}`)
    await editTitle(build.title)
    expect((await page(path)).html).not.toContain(`${build.title} ${word}`)
  })

  it('never stores an answer that sets a cookie', async () => {
    await rename(`${shopName} E`)
    // Test mode sets a cookie on a page answer when asked (server/plugins/testing-cookie.ts).
    const withCookie = await page(SHOP_PAGE, { 'x-test-set-cookie': '1' })
    expect(withCookie.headers.get('set-cookie')).toContain('tw_test=1')
    expect(withCookie.html).toContain(`${shopName} E`)
    await nameRoundTheApp(`${shopName} F`)
    expect((await page(SHOP_PAGE)).html).toContain(`${shopName} F`)
  })

  it('shows a review on the shop\'s page at once after it is written', async () => {
    const order = await makeOrder(t.ctx)
    await pastDeal(t.db, {
      requestId: order.requestId, orderId: order.orderId, shopUserId: order.shop.id, at: new Date(Date.now() - 100 * DAY), quoteAfterH: 5, orderStatus: 'completed',
      milestones: [{ dueDay: 10, submittedDay: 9, state: 'released' }],
    })
    // The shop page is stored now: only a dropped cache shows the review.
    expect((await page(SHOP_PAGE)).status).toBe(200)
    const body = `The block came back square and the paperwork matched the quote (${order.orderId}).`
    const res = await dealHttp().post(`/api/orders/${order.orderId}/review`, { rating: 5, aspects: { communication: 5, keptToQuote: 5, powerVsTarget: null, finishAndPaperwork: 5 }, body }, jars.racer)
    expect(res.status).toBe(201)
    expect((await page(SHOP_PAGE)).html).toContain(body)
  })
})
