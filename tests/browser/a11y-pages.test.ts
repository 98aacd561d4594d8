// Accessibility in Chromium: axe-core (WCAG 2.1 A and AA rules) on every page of the app, each opened
// by the role that uses it, with no serious or critical violation; and the keyboard paths that axe
// cannot see: the skip link and the search's band control.
// Source: W3C, Web Content Accessibility Guidelines (WCAG) 2.1, level AA; the rules as axe-core 4.11 implements them.
import { readdirSync } from 'node:fs'
import { join, relative } from 'node:path'
import { AxeBuilder } from '@axe-core/playwright'
import { and, asc, eq } from 'drizzle-orm'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { PERSONAS, SHOP } from '../support/auth'
import { openBrowser, signInPage } from '../support/browser'
import { baseUrl, schema } from '../support/context'
import { dealTestContext, fundMilestone, makeDispute, makeOrder } from '../support/deals'
import { makeSubmittedPull } from '../support/fixtures'
import type { DealContext } from '../../server/services/deal-context'
import type { Database } from '../../server/database/types'

type Role = 'visitor' | 'racer' | 'shop' | 'admin'
const SIGN_IN: Record<Exclude<Role, 'visitor'>, string> = { racer: PERSONAS.racer, shop: PERSONAS.shop, admin: PERSONAS.admin }

let browser: Awaited<ReturnType<typeof openBrowser>>
let page: Page
let ctx: DealContext
let db: Database
let close: () => Promise<void>

beforeAll(async () => {
  ({ ctx, db, close } = await dealTestContext())
  browser = await openBrowser()
  page = browser.page
})
afterAll(async () => {
  await browser?.close()
  await close?.()
})

/** Every page file under pages/, as its route pattern (`/builds/[slug]`). */
function pageRoutes(): string[] {
  const root = join(process.cwd(), 'pages')
  const walk = (dir: string): string[] => readdirSync(dir, { withFileTypes: true }).flatMap(e => e.isDirectory() ? walk(join(dir, e.name)) : e.name.endsWith('.vue') ? [join(dir, e.name)] : [])
  return walk(root).map((file) => {
    const route = `/${relative(root, file).replace(/\.vue$/, '').replace(/(^|\/)index$/, '')}`
    return route === '/' ? route : route.replace(/\/$/, '')
  }).sort()
}

/** The serious and critical violations axe finds on the open page, one line per rule with a few of its nodes. */
async function violations(): Promise<string[]> {
  const result = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze()
  return result.violations
    .filter(v => v.impact === 'serious' || v.impact === 'critical')
    .map(v => `${v.id} (${v.impact}, ${v.nodes.length} nodes): ${v.nodes.slice(0, 4).map(n => `${n.target.join(' ')}${n.failureSummary ? ` — ${n.failureSummary.split('\n').slice(1, 2).join('').trim()}` : ''}`).join(' | ')}`)
}

let signedInAs: Role = 'visitor'
async function become(role: Role) {
  if (signedInAs === role) return
  await browser.context.clearCookies()
  if (role !== 'visitor') await signInPage(page, SIGN_IN[role])
  signedInAs = role
}

/** Opens a page as a role, waits until it has hydrated, and answers axe's serious and critical findings. */
async function audit(role: Role, path: string): Promise<string[]> {
  await become(role)
  const res = await page.goto(`${baseUrl()}${path}`, { waitUntil: 'networkidle' })
  expect(res?.status(), `${role} ${path}`).toBeLessThan(400)
  await expect.poll(() => page.evaluate(() => Boolean((document.querySelector('#__nuxt') as { __vue_app__?: unknown } | null)?.__vue_app__))).toBe(true)
  return (await violations()).map(v => `${role} ${path}: ${v}`)
}

describe('axe-core on every page, as its role (WCAG 2.1 AA)', () => {
  it('finds no serious or critical violation on any page, and covers every page file', async () => {
    const [build] = await db.select({ id: schema.builds.id, slug: schema.builds.slug }).from(schema.builds)
      .innerJoin(schema.shops, eq(schema.shops.id, schema.builds.shopId))
      .where(and(eq(schema.builds.status, 'published'), eq(schema.shops.slug, SHOP))).orderBy(asc(schema.builds.id)).limit(1)
    const { pullId } = await makeSubmittedPull(db, build!.slug)
    const dispute = await makeDispute(ctx)
    const order = await makeOrder(ctx)
    const paid = await fundMilestone(ctx, order.racer, order.milestones[0]!.id)
    expect(paid.redirect).toBeTruthy()

    // Each page pattern, with the role that uses it and the concrete address to open.
    const visits: Record<string, [Role, string][]> = {
      '/': [['visitor', '/'], ['racer', '/'], ['shop', '/']],
      '/search': [['visitor', '/search?q=small+block']],
      '/compare': [['visitor', `/compare?builds=${build!.slug}`]],
      '/tools': [['visitor', '/tools']],
      '/sign-in': [['visitor', '/sign-in']],
      '/sign-in/link': [['visitor', '/sign-in/link']],
      '/sign-up': [['visitor', '/sign-up']],
      '/check-inbox': [['visitor', '/check-inbox?email=someone%40example.test']],
      '/builds/[slug]': [['visitor', `/builds/${build!.slug}`]],
      '/builders/[slug]': [['visitor', `/builders/${SHOP}`]],
      '/account': [['racer', '/account']],
      '/notifications': [['racer', '/notifications']],
      '/deals': [['racer', '/deals'], ['shop', '/deals'], ['admin', '/deals']],
      '/deals/new': [['racer', `/deals/new?builder=${SHOP}&build=${build!.slug}`]],
      '/deals/requests/[id]': [['racer', `/deals/requests/${order.requestId}`], ['shop', `/deals/requests/${order.requestId}`]],
      '/deals/requests/[id]/quote': [['shop', `/deals/requests/${order.requestId}/quote`]],
      '/deals/orders/[id]': [['racer', `/deals/orders/${order.orderId}`], ['shop', `/deals/orders/${order.orderId}`]],
      '/deals/orders/[id]/paid': [['racer', `/deals/orders/${order.orderId}/paid?milestone=${order.milestones[0]!.id}`]],
      '/dashboard': [['shop', '/dashboard']],
      '/dashboard/builds/new': [['shop', '/dashboard/builds/new']],
      '/dashboard/builds/[id]': [['shop', `/dashboard/builds/${build!.id}`]],
      '/admin': [['admin', '/admin']],
      '/admin/audit': [['admin', '/admin/audit']],
      '/admin/disputes': [['admin', '/admin/disputes']],
      '/admin/disputes/[id]': [['admin', `/admin/disputes/${dispute.milestone.id}`]],
      '/admin/evidence': [['admin', '/admin/evidence']],
      '/admin/evidence/[id]': [['admin', `/admin/evidence/${pullId}`]],
      '/admin/listings': [['admin', '/admin/listings']],
      '/admin/users': [['admin', '/admin/users']],
      '/admin/reviews': [['admin', '/admin/reviews']],
      '/swaps': [['visitor', '/swaps?change=camshaft']],
      '/track-record/[slug]/[figure]': [['visitor', `/track-record/${SHOP}/on-time`]],
    }
    // A new page file fails here until it has a row above.
    expect(pageRoutes().filter(r => !visits[r])).toEqual([])

    // Grouped by role so each sign-in happens once.
    const all = Object.values(visits).flat()
    const found: string[] = []
    for (const role of ['visitor', 'racer', 'shop', 'admin'] as const) {
      for (const [r, path] of all) if (r === role) found.push(...await audit(role, path))
    }
    expect(found).toEqual([])
  }, 600_000)
})

describe('keyboard paths', () => {
  it('reaches the skip link with the first Tab, and Enter moves focus to the main content', async () => {
    await become('visitor')
    await page.goto(`${baseUrl()}/search?q=small+block`, { waitUntil: 'networkidle' })
    await page.keyboard.press('Tab')
    const first = await page.evaluate(() => ({ text: document.activeElement?.textContent?.trim(), href: document.activeElement?.getAttribute('href') }))
    expect(first).toEqual({ text: 'Skip to content', href: '#main' })
    // Visible while focused (it hides off-screen otherwise).
    const box = await page.locator(':focus').boundingBox()
    expect(box && box.width > 0 && box.y >= 0).toBe(true)
    await page.keyboard.press('Enter')
    await expect.poll(() => page.evaluate(() => {
      const main = document.getElementById('main')
      return Boolean(main && (document.activeElement === main || main.contains(document.activeElement)))
    })).toBe(true)
    // The next Tab lands inside the main content, not back in the header.
    await page.keyboard.press('Tab')
    expect(await page.evaluate(() => Boolean(document.getElementById('main')?.contains(document.activeElement)))).toBe(true)
  })

  it('enables "Use this band" while the shift is typed; Tab reaches it and Enter applies the band and keeps the search', async () => {
    await become('visitor')
    await page.goto(`${baseUrl()}/search?q=small+block`, { waitUntil: 'networkidle' })
    const query = await page.inputValue('[data-test="search-q"]')
    expect(query).toBe('small block')
    await page.locator('[data-test="field-bandFrom"]').fill('4600')
    await page.locator('[data-test="field-bandTo"]').fill('')
    await page.locator('[data-test="field-bandTo"]').click()
    const apply = page.locator('[data-test="band-keep"]')
    expect(await apply.isDisabled()).toBe(true)
    // Enabled while the shift is typed, before the field loses focus.
    await page.keyboard.type('7000')
    expect(await page.locator('[data-test="field-bandTo"]').evaluate(el => el === document.activeElement)).toBe(true)
    expect(await apply.isEnabled()).toBe(true)
    // The next Tab from the shift field is the enabled button.
    await page.keyboard.press('Tab')
    expect(await apply.evaluate(el => el === document.activeElement)).toBe(true)
    await page.keyboard.press('Enter')
    await page.waitForURL(/bandTo=7000/)
    const url = new URL(page.url())
    expect(url.searchParams.get('q')).toBe('small block')
    expect(await page.inputValue('[data-test="search-q"]')).toBe('small block')
  })

  it('never wipes the search when Enter is pressed in a band field', async () => {
    await become('visitor')
    await page.goto(`${baseUrl()}/search?q=small+block`, { waitUntil: 'networkidle' })
    // The band the previous test kept in this browser comes back; the fields are cleared and typed afresh.
    await page.locator('[data-test="field-bandFrom"]').fill('4400')
    await page.locator('[data-test="field-bandTo"]').fill('')
    await page.locator('[data-test="field-bandTo"]').click()
    await page.keyboard.type('6800')
    await page.keyboard.press('Enter')
    await page.waitForURL(/bandTo=6800/)
    expect(new URL(page.url()).searchParams.get('q')).toBe('small block')
    expect(await page.inputValue('[data-test="search-q"]')).toBe('small block')
  })
})
