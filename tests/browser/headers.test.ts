// The security headers as Chromium enforces them: the app's pages run under their Content-Security-Policy
// without a single violation, the site's own writes pass the cross-site check, and a form on another
// origin of the same site (which SameSite=Lax does not stop) cannot cancel a racer's order.
import { eq } from 'drizzle-orm'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PASSWORD, PERSONAS } from '../support/auth'
import { openBrowser } from '../support/browser'
import { baseUrl, schema } from '../support/context'
import { dealTestContext, makeOrder } from '../support/deals'
import type { DealContext } from '../../server/services/deal-context'
import type { Database } from '../../server/database/types'

let browser: Awaited<ReturnType<typeof openBrowser>>
let page: Page
let ctx: DealContext
let db: Database
let close: () => Promise<void>
/** What the pages reported: CSP violations (the DOM event), CSP console messages and uncaught errors. */
const problems: string[] = []

beforeAll(async () => {
  ({ ctx, db, close } = await dealTestContext())
  browser = await openBrowser()
  page = browser.page
  // Runs before the page's own scripts in every document (CSP does not apply to it).
  await browser.context.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => {
      console.error(`securitypolicyviolation: ${e.violatedDirective} blocked ${e.blockedURI || 'inline'} at ${e.sourceFile}:${e.lineNumber}`)
    })
  })
  page.on('console', (msg) => {
    if (msg.type() === 'error' && /securitypolicyviolation|Content Security Policy|Refused to/i.test(msg.text())) problems.push(`${page.url()}: ${msg.text()}`)
  })
  page.on('pageerror', err => problems.push(`${page.url()}: ${err.message}`))
})
afterAll(async () => {
  await browser?.close()
  await close?.()
})

/** Opens a page, waits until it has loaded and hydrated, and checks it ran under the CSP without a violation. */
async function visit(path: string, ready: string) {
  const res = await page.goto(`${baseUrl()}${path}`, { waitUntil: 'networkidle' })
  expect(res?.status(), path).toBe(200)
  expect(res?.headers()['content-security-policy'], path).toMatch(/script-src 'self' 'strict-dynamic' 'nonce-/)
  await page.locator(ready).first().waitFor()
  // Hydrated: Vue mounted the app on #__nuxt, which a CSP that blocked Nuxt's scripts would have prevented.
  await expect.poll(() => page.evaluate(() => Boolean((document.querySelector('#__nuxt') as { __vue_app__?: unknown } | null)?.__vue_app__))).toBe(true)
  expect(problems, path).toEqual([])
}

/** Signs Chromium in as the demo racer through the sign-in form (a write the origin check must let through). */
async function signInAsRacer() {
  await browser.context.clearCookies()
  await page.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' })
  await page.fill('#field-email', PERSONAS.racer)
  await page.fill('#field-password', DEMO_PASSWORD)
  await page.click('[data-test="password-form"] button[type="submit"]')
  await page.locator('[data-test="nav-account"]').waitFor()
}

describe('pages under the CSP in Chromium', () => {
  it('runs the public pages without a CSP violation: home, search, a build with its charts, tools, sign-in', async () => {
    const [build] = await db.select({ slug: schema.builds.slug }).from(schema.builds).where(eq(schema.builds.status, 'published')).limit(1)
    await visit('/', '[data-test="main-nav"]')
    await visit('/search', '[data-test="main-nav"]')
    await visit(`/builds/${build!.slug}`, 'canvas')
    await visit('/tools', '[data-test="main-nav"]')
    await visit('/builders/tallgrass-racing-engines', '[data-test="track-record"]')
    await visit('/track-record/tallgrass-racing-engines/on-time', '[data-test="record-items"]')
    await visit('/sign-in', '[data-test="password-form"]')
    expect(problems).toEqual([])
  })

  it('hydrates a page served from the HTML page cache, with its fresh nonce, without a CSP violation', async () => {
    // Anonymous, with no Auth.js cookie at all (the sign-in page above set its housekeeping cookies).
    await browser.context.clearCookies()
    const shop = 'tallgrass-racing-engines'
    const [row] = await db.select({ shopName: schema.shops.shopName }).from(schema.shops).where(eq(schema.shops.slug, shop))
    await visit(`/builders/${shop}`, '[data-test="track-record"]')
    const first = await page.evaluate(() => document.querySelector('script[nonce]') ? (document.querySelector('script[nonce]') as HTMLScriptElement).nonce : '')
    // A rename written straight to MariaDB (no hook): a page that still shows the old name came from the cache.
    await db.update(schema.shops).set({ shopName: `${row!.shopName} (round the app)` }).where(eq(schema.shops.slug, shop))
    try {
      await visit(`/builders/${shop}`, '[data-test="track-record"]')
      await expect.poll(() => page.locator('[data-test="shop-name"]').textContent()).toBe(row!.shopName)
      const second = await page.evaluate(() => (document.querySelector('script[nonce]') as HTMLScriptElement | null)?.nonce ?? '')
      expect(second).toMatch(/^[A-Za-z0-9+/]{24}$/)
      expect(second).not.toBe(first)
    }
    finally {
      await db.update(schema.shops).set({ shopName: row!.shopName }).where(eq(schema.shops.slug, shop))
    }
  })

  it('signs in through the form and opens the deal pages without a violation; its own writes pass the origin check', async () => {
    await signInAsRacer()

    const { requestId, orderId } = await makeOrder(ctx)
    await visit('/deals', '[data-test="main-nav"]')
    await visit('/deals/new', '[data-test="main-nav"]')
    await visit(`/deals/requests/${requestId}`, '[data-test="thread"]')
    const text = `Checked under the CSP ${Date.now().toString(36)}`
    await page.fill('[data-test="message-input"]', text)
    await page.click('[data-test="message-send"]')
    await expect.poll(() => page.locator('[data-test="message-body"]').allInnerTexts()).toContain(text)
    await visit(`/deals/orders/${orderId}`, '[data-test="milestone"]')
    await visit('/notifications', '[data-test="notification"]')
    expect(problems).toEqual([])
  })

  it('refuses a form on another origin of the same site that posts to the order\'s cancel route, and the order stays active', async () => {
    await signInAsRacer()
    const { orderId } = await makeOrder(ctx)
    // Chromium is signed in as the racer; the session cookie is SameSite=Lax, which a
    // same-site origin (another port of this host) still receives, so only the origin check stands here.
    const app = new URL(baseUrl())
    const forged = `http://${app.hostname}:${Number(app.port) + 1}/prize`
    await page.route(forged, route => route.fulfill({
      contentType: 'text/html',
      body: `<form method="post" action="${baseUrl()}/api/orders/${orderId}/cancel"><input name="reason" value="forged"></form><script>document.forms[0].submit()</script>`,
    }))
    const answer = page.waitForResponse(res => res.url().endsWith(`/api/orders/${orderId}/cancel`))
    await page.goto(forged)
    const res = await answer
    expect(res.status()).toBe(403)
    expect((await res.request().allHeaders()).origin).toBe(new URL(forged).origin)
    const [row] = await db.select({ status: schema.orders.status }).from(schema.orders).where(eq(schema.orders.id, orderId))
    expect(row!.status).toBe('active')
  })
})
