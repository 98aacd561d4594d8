// Every page on a phone: each page file under pages/ is opened at 390 CSS px wide, as the role that
// uses it, and must not scroll sideways nor show a control too small to hit with a thumb. Then the
// header menu and the quote composer's new row are checked with the keyboard alone.
import { mkdirSync, readdirSync } from 'node:fs'
import { join, relative, resolve } from 'node:path'
import { and, asc, eq } from 'drizzle-orm'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { PERSONAS, SHOP } from '../support/auth'
import { openBrowser, signInPage } from '../support/browser'
import { baseUrl, schema, testDb } from '../support/context'
import { dealTestContext, makeDispute, requestInput, actorByEmail, PEOPLE } from '../support/deals'
import { createRequest } from '../../server/services/deals'
import { makeSubmittedPull } from '../support/fixtures'
import { buildIds, COMPLETE_COMBINATION, inventedPullCsv, removeBuildsSince } from '../support/builds'
import { CARDS } from '../support/payments'
import { VERIFICATION } from '../../shared/vocabulary'

/** An iPhone 12–15's viewport in CSS px (the product's phone width). */
const PHONE = { width: 390, height: 844 }
const DESK = { width: 1366, height: 900 }
// WCAG 2.2 SC 2.5.8 "Target Size (Minimum)": a pointer target is at least 24 × 24 CSS px.
const WCAG_TARGET_MIN = 24
// The product's own rule: a field or button a thumb must hit is at least 44 px wide.
const PRODUCT_MIN_WIDTH = 44
// Screenshots for a person to look at, only when asked for (never committed).
const SHOTS = process.env.TW_SHOTS_DIR

type Role = 'visitor' | 'racer' | 'shop' | 'admin'
const EMAIL: Record<Exclude<Role, 'visitor'>, string> = { racer: PERSONAS.racer, shop: PERSONAS.shop, admin: PERSONAS.admin }

/** The page files, as paths under pages/ without ".vue" ("deals/orders/[id]/paid"). */
function pageFiles(dir = resolve(import.meta.dirname, '..', '..', 'pages')): string[] {
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter(e => e.isFile() && e.name.endsWith('.vue'))
    .map(e => relative(dir, join(e.parentPath, e.name)).replace(/\.vue$/, '').split('\\').join('/'))
    .sort()
}

interface Ids { build: string, other: string, buildId: number, shop: string, requestId: number, openRequestId: number, orderId: number, milestoneId: number, pullId: number }
let ids: Ids
let seededBuilds: Set<number>

/** Each page file, who opens it, and its address with the fixtures' ids. */
const PAGES: Record<string, { role: Role, url: (i: Ids) => string }> = {
  'index': { role: 'visitor', url: () => '/' },
  'search': { role: 'visitor', url: () => '/search' },
  'compare': { role: 'visitor', url: i => `/compare?builds=${i.build},${i.other}` },
  'tools': { role: 'visitor', url: () => '/tools' },
  'sign-up': { role: 'visitor', url: () => '/sign-up' },
  'sign-in/index': { role: 'visitor', url: () => '/sign-in' },
  'sign-in/link': { role: 'visitor', url: () => '/sign-in/link?token=not-a-real-token' },
  'check-inbox': { role: 'visitor', url: () => '/check-inbox?email=someone%40example.test' },
  'builds/[slug]': { role: 'visitor', url: i => `/builds/${i.build}` },
  'builders/[slug]': { role: 'visitor', url: i => `/builders/${i.shop}` },
  'account': { role: 'racer', url: () => '/account' },
  'notifications': { role: 'racer', url: () => '/notifications' },
  'deals/index': { role: 'racer', url: () => '/deals' },
  'deals/new': { role: 'racer', url: i => `/deals/new?builder=${i.shop}&build=${i.build}` },
  'deals/requests/[id]/index': { role: 'racer', url: i => `/deals/requests/${i.requestId}` },
  'deals/orders/[id]/index': { role: 'racer', url: i => `/deals/orders/${i.orderId}` },
  'deals/orders/[id]/paid': { role: 'racer', url: i => `/deals/orders/${i.orderId}/paid?milestone=${i.milestoneId}` },
  'deals/requests/[id]/quote': { role: 'shop', url: i => `/deals/requests/${i.openRequestId}/quote` },
  'dashboard/index': { role: 'shop', url: () => '/dashboard' },
  'dashboard/builds/new': { role: 'shop', url: () => '/dashboard/builds/new' },
  'dashboard/builds/[id]': { role: 'shop', url: i => `/dashboard/builds/${i.buildId}` },
  'admin/index': { role: 'admin', url: () => '/admin' },
  'admin/audit': { role: 'admin', url: () => '/admin/audit' },
  'admin/users': { role: 'admin', url: () => '/admin/users' },
  'admin/listings': { role: 'admin', url: () => '/admin/listings' },
  'admin/evidence/index': { role: 'admin', url: () => '/admin/evidence' },
  'admin/evidence/[id]': { role: 'admin', url: i => `/admin/evidence/${i.pullId}` },
  'admin/disputes/index': { role: 'admin', url: () => '/admin/disputes' },
  'admin/disputes/[id]': { role: 'admin', url: i => `/admin/disputes/${i.milestoneId}` },
  'admin/reviews': { role: 'admin', url: () => '/admin/reviews' },
  'swaps': { role: 'visitor', url: () => '/swaps?change=camshaft' },
  'track-record/[slug]/[figure]': { role: 'visitor', url: i => `/track-record/${i.shop}/on-time` },
}

interface Finding { scrollWidth: number, wide: string[], scrollers: string[], small: string[] }

/**
 * What the page breaks at the current width: the document's scroll width, the elements that reach
 * past the right edge, and the visible controls below the size rules. Checked: input (not hidden),
 * select, textarea and button. Text fields, selects and buttons must be 44 px wide (the product's
 * rule) and 24 px high (WCAG 2.5.8); a checkbox or radio is hit through its label, so its label
 * (or the box, if it has none) must be 24 × 24 (WCAG 2.5.8).
 */
function inspect(page: Page, minWidth: number, minTarget: number): Promise<Finding> {
  return page.evaluate(({ minWidth, minTarget }) => {
    const name = (el: Element) => {
      const label = el.getAttribute('aria-label') ?? el.getAttribute('name') ?? el.getAttribute('data-test') ?? (el.textContent ?? '').trim().slice(0, 30)
      return `${el.tagName.toLowerCase()}${el.id ? `#${el.id}` : ''} "${label}"`
    }
    const vw = document.documentElement.clientWidth
    const wide = [...document.querySelectorAll('body *')]
      .filter((el) => {
        const r = el.getBoundingClientRect()
        return r.width > 0 && r.right > vw + 1 && el.checkVisibility() && !el.closest('[data-overflow-ok]')
      })
      .slice(0, 6)
      .map(el => `${name(el)} right=${Math.round(el.getBoundingClientRect().right)}`)
    // A box that scrolls sideways inside the page hides columns just as well (a table's actions).
    const scrollers = [...document.querySelectorAll<HTMLElement>('body *')]
      .filter((el) => {
        const overflow = getComputedStyle(el).overflowX
        return (overflow === 'auto' || overflow === 'scroll') && el.scrollWidth > el.clientWidth + 1 && el.checkVisibility() && !el.closest('[data-overflow-ok]')
      })
      .map(el => `${name(el)} ${el.scrollWidth}>${el.clientWidth}`)
    const small: string[] = []
    for (const el of document.querySelectorAll<HTMLElement>('input, select, textarea, button')) {
      if (el instanceof HTMLInputElement && el.type === 'hidden') continue
      if (!el.checkVisibility({ checkOpacity: true, checkVisibilityCSS: true })) continue
      const box = el.getBoundingClientRect()
      // Visually hidden on purpose (the sr-only pattern: 1 × 1 px, clipped) or a file input under its styled label.
      if (box.width <= 1 || box.height <= 1) continue
      const choice = el instanceof HTMLInputElement && (el.type === 'checkbox' || el.type === 'radio')
      if (choice) {
        const label = el.closest('label') ?? (el.id ? document.querySelector(`label[for="${el.id}"]`) : null)
        const target = (label ?? el).getBoundingClientRect()
        if (target.width < minTarget || target.height < minTarget) small.push(`${name(el)} ${Math.round(target.width)}×${Math.round(target.height)}`)
        continue
      }
      if (box.width < minWidth || box.height < minTarget) small.push(`${name(el)} ${Math.round(box.width)}×${Math.round(box.height)}`)
    }
    return { scrollWidth: document.documentElement.scrollWidth, wide, scrollers, small }
  }, { minWidth, minTarget })
}

let browser: Awaited<ReturnType<typeof openBrowser>>
let page: Page
let signedInAs: Role = 'visitor'

async function actAs(role: Role) {
  if (role === signedInAs) return
  await browser.context.clearCookies()
  if (role !== 'visitor') await signInPage(page, EMAIL[role])
  signedInAs = role
}

beforeAll(async () => {
  const { ctx, db, close } = await dealTestContext()
  const [build, other] = await db.select({ slug: schema.builds.slug, id: schema.builds.id }).from(schema.builds)
    .innerJoin(schema.shops, eq(schema.shops.id, schema.builds.shopId))
    .where(and(eq(schema.shops.slug, SHOP), eq(schema.builds.status, 'published'))).orderBy(asc(schema.builds.id)).limit(2)
  const dispute = await makeDispute(ctx, { title: `Phone check ${Date.now().toString(36)}` })
  const racer = await actorByEmail(db, PEOPLE.racer)
  const open = await createRequest(ctx, racer, requestInput({ title: 'Phone check, open request' }))
  const { pullId } = await makeSubmittedPull(db, build!.slug)
  seededBuilds = await buildIds(db)
  ids = { build: build!.slug, other: other!.slug, buildId: build!.id, shop: SHOP, requestId: dispute.requestId, openRequestId: open.id, orderId: dispute.orderId, milestoneId: dispute.milestone.id, pullId }
  await close()
  browser = await openBrowser()
  page = browser.page
  if (SHOTS) mkdirSync(SHOTS, { recursive: true })
})
afterAll(async () => {
  await browser?.close()
  const { db, close } = await testDb()
  if (seededBuilds) await removeBuildsSince(db, seededBuilds)
  await close()
})

/** The page's scroll width now (it must stay within the phone's 390 px). */
const scrollWidth = () => page.evaluate(() => document.documentElement.scrollWidth)
const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)

describe('every page on a 390 px phone', () => {
  it('lists every page file, so a new page cannot be left out', () => {
    const files = pageFiles()
    expect(files.length).toBeGreaterThan(20)
    expect(files.filter(f => !(f in PAGES))).toEqual([])
    expect(Object.keys(PAGES).filter(k => !files.includes(k))).toEqual([])
  })

  it('no page scrolls sideways and every control is big enough to hit', async () => {
    const failures: string[] = []
    const order: Role[] = ['visitor', 'racer', 'shop', 'admin']
    const entries = Object.entries(PAGES).sort(([, a], [, b]) => order.indexOf(a.role) - order.indexOf(b.role))
    for (const [file, { role, url }] of entries) {
      await actAs(role)
      await page.setViewportSize(PHONE)
      const res = await page.goto(`${baseUrl()}${url(ids)}`, { waitUntil: 'networkidle' })
      expect(res?.status(), `${file} answers`).toBeLessThan(500)
      // Charts draw after hydration; give layout a frame to settle.
      await page.evaluate(() => new Promise(r => requestAnimationFrame(() => r(null))))
      const found = await inspect(page, PRODUCT_MIN_WIDTH, WCAG_TARGET_MIN)
      if (found.scrollWidth > PHONE.width) failures.push(`${file}: scrollWidth ${found.scrollWidth} > ${PHONE.width} (${found.wide.join('; ')})`)
      if (found.scrollers.length) failures.push(`${file}: scrolls sideways inside ${found.scrollers.join('; ')}`)
      if (found.small.length) failures.push(`${file}: small controls ${found.small.join('; ')}`)
      if (SHOTS) {
        const shot = file.replace(/[/[\]]/g, '_')
        // The phone page in screen-high slices (a whole tall page shrinks past reading), then the desktop.
        const height = await page.evaluate(() => document.documentElement.scrollHeight)
        for (let y = 0, n = 0; y < height && n < 4; y += 1300, n++) {
          await page.screenshot({ path: join(SHOTS, `${shot}-390-${n}.png`), fullPage: true, clip: { x: 0, y, width: PHONE.width, height: Math.min(1300, height - y) } })
        }
        await page.setViewportSize(DESK)
        await page.screenshot({ path: join(SHOTS, `${shot}-1366.png`), fullPage: true })
      }
    }
    expect(failures).toEqual([])
  }, 300_000)
})

describe('the keyboard on a phone', () => {
  it('the header menu opens with Enter, Escape closes it and focus returns to its button', async () => {
    await actAs('racer')
    await page.setViewportSize(PHONE)
    await page.goto(`${baseUrl()}/search`, { waitUntil: 'networkidle' })
    const menu = page.locator('[data-test="nav-menu"]')
    const nav = page.locator('[data-test="main-nav"]')
    // One row at 390 px: the header is no taller than the menu button's row.
    expect(await page.locator('header').first().evaluate(el => el.getBoundingClientRect().height)).toBeLessThan(80)
    expect(await nav.isVisible()).toBe(false)
    expect(await menu.getAttribute('aria-expanded')).toBe('false')
    await menu.focus()
    await page.keyboard.press('Enter')
    expect(await menu.getAttribute('aria-expanded')).toBe('true')
    expect(await nav.isVisible()).toBe(true)
    await page.keyboard.press('Tab')
    expect(await page.evaluate(() => document.activeElement?.closest('[data-test="main-nav"]') !== null)).toBe(true)
    if (SHOTS) await page.screenshot({ path: join(SHOTS, 'header-menu-open-390.png') })
    // The open panel lies over the page: a tap anywhere on one of its controls lands on the panel.
    expect(await nav.evaluate(el => [...el.querySelectorAll('a, button')].flatMap((c) => {
      const r = c.getBoundingClientRect()
      return [[r.x + r.width / 2, r.y + 3], [r.x + r.width / 2, r.bottom - 3]].filter(([x, y]) => !el.contains(document.elementFromPoint(x!, y!))).map(() => c.textContent?.trim())
    }))).toEqual([])
    await page.keyboard.press('Escape')
    expect(await menu.getAttribute('aria-expanded')).toBe('false')
    expect(await nav.isVisible()).toBe(false)
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-test'))).toBe('nav-menu')
    // A link in the menu navigates and the menu closes behind it.
    await menu.click()
    await page.click('[data-test="nav-tools"]')
    await page.waitForURL(/\/tools$/)
    // The panel closes once the new page is shown, which waits for that page's chunks (the URL changes first).
    await expect.poll(() => nav.isVisible(), { timeout: 5000 }).toBe(false)
  })

  it('"+ Add a line" and "+ Add a milestone" put the keyboard in the new row, named with its number', async () => {
    await actAs('shop')
    await page.setViewportSize(PHONE)
    await page.goto(`${baseUrl()}/deals/requests/${ids.openRequestId}/quote`, { waitUntil: 'networkidle' })
    await page.locator('[data-test="add-line"]').focus()
    await page.keyboard.press('Enter')
    const focused = () => page.evaluate(() => ({ label: document.activeElement?.getAttribute('aria-label') ?? '', row: document.activeElement?.closest('[data-test]')?.getAttribute('data-test') }))
    expect(await focused()).toEqual({ label: 'Category, line 2', row: 'line-item' })
    await page.keyboard.type('Machine work')
    expect(await page.locator('[data-test="line-item"]').nth(1).getByLabel('Category').inputValue()).toBe('Machine work')
    await page.locator('[data-test="add-milestone"]').focus()
    await page.keyboard.press('Enter')
    expect(await focused()).toEqual({ label: 'Milestone title, milestone 3', row: 'milestone-row' })
    // Every field of a row says which row it is in.
    const names = await page.locator('[data-test="line-item"]').nth(1).locator('input').evaluateAll(els => els.map(el => el.getAttribute('aria-label')))
    expect(names).toEqual(['Category, line 2', 'Description, line 2', 'Part number, line 2', 'Quantity, line 2', 'Unit price, line 2'])
  })
})

describe('the charts without a mouse', () => {
  it('name each canvas, toggle a line from the key with the keyboard, and show the figures as a table', async () => {
    await actAs('visitor')
    await page.setViewportSize(PHONE)
    await page.goto(`${baseUrl()}/builds/${ids.build}`, { waitUntil: 'networkidle' })
    const canvas = page.locator('[data-test="curves-chart"] canvas').first()
    await canvas.waitFor()
    expect(await canvas.getAttribute('role')).toBe('img')
    expect(await canvas.getAttribute('aria-label')).toMatch(/^Power and torque against engine speed, \d+ curves?\. Pull 1 \(.+\): peak [\d,.]+ hp at [\d,]+ rpm, peak [\d,.]+ lb·ft at [\d,]+ rpm/)
    // Short names in the key: "Pull 1 · power", the full title beside it.
    const toggles = page.locator('[data-test="chart-key-toggle"]')
    expect((await toggles.allInnerTexts()).slice(0, 2).map(t => t.trim())).toEqual(['Pull 1 · power', 'Pull 1 · torque'])
    await toggles.first().focus()
    await page.keyboard.press('Space')
    expect(await toggles.first().getAttribute('aria-pressed')).toBe('false')
    await page.keyboard.press('Enter')
    expect(await toggles.first().getAttribute('aria-pressed')).toBe('true')
    const figures = page.locator('[data-test="chart-figures"]').first()
    await figures.locator('summary').focus()
    await page.keyboard.press('Enter')
    expect(await figures.evaluate(el => (el as HTMLDetailsElement).open)).toBe(true)
    // The tables are drawn when the disclosure opens.
    await expect.poll(() => figures.locator('table').first().locator('tbody tr').count()).toBeGreaterThan(10)
    expect(await scrollWidth()).toBeLessThanOrEqual(PHONE.width)
  })
})

describe('the whole job on a phone', () => {
  it('a racer requests, the shop quotes, the racer pays, the shop submits, the racer approves; the shop lists a build with a pull', async () => {
    const title = `Phone deal ${Date.now().toString(36)}`
    // The racer asks for a quote from a build page.
    await actAs('racer')
    await page.setViewportSize(PHONE)
    await page.goto(`${baseUrl()}/builds/${ids.build}`, { waitUntil: 'networkidle' })
    await page.click('[data-test="request-quote"]')
    await page.locator('[data-test="request-form"]').waitFor()
    expect(await scrollWidth()).toBeLessThanOrEqual(PHONE.width)
    await page.fill('input[name="title"]', title)
    await page.fill('input[name="targetHp"]', '620')
    await page.fill('input[name="targetTq"]', '540')
    await page.fill('input[name="displacementCapCi"]', '400')
    await page.selectOption('select[name="fuel"]', 'race_gas')
    await page.selectOption('select[name="transmission"]', 'automatic')
    await page.fill('input[name="stallRpm"]', '4600')
    await page.fill('input[name="shiftRpm"]', '7000')
    await page.fill('input[name="budgetMin"]', '18,000')
    await page.fill('input[name="budgetMax"]', '26,000')
    await page.fill('input[name="deadline"]', inDays(150))
    await page.click('[data-test="request-submit"]')
    await page.waitForURL(/\/deals\/requests\/\d+$/)
    const requestUrl = page.url()

    // The shop quotes it: two lines, two milestones split 30 / 70 %.
    await actAs('shop')
    await page.setViewportSize(PHONE)
    await page.goto(requestUrl, { waitUntil: 'networkidle' })
    await page.click('[data-test="write-quote"]')
    await page.locator('[data-test="quote-editor"]').waitFor()
    await page.click('[data-test="add-line"]')
    for (const [i, [category, description, price]] of [['Machine work', 'Bore, hone and deck', '6,000'], ['Assembly and dyno', 'Assembly and dyno tuning', '4,000']].entries()) {
      const row = page.locator('[data-test="line-item"]').nth(i)
      await row.getByLabel('Category').fill(category!)
      await row.getByLabel('Description').fill(description!)
      await row.getByLabel('Unit price').fill(price!)
    }
    expect(await page.locator('[data-test="editor-total"]').innerText()).toBe('$10,000.00')
    await page.click('[data-test="apply-split"]')
    expect(await page.locator('[data-test="milestone-row"]').nth(0).getByLabel('Amount').inputValue()).toBe('3000.00')
    expect(await scrollWidth()).toBeLessThanOrEqual(PHONE.width)
    await page.click('[data-test="send-quote"]')
    await page.waitForURL(requestUrl)
    await page.locator('[data-test="quote-panel"]').waitFor()

    // The racer accepts and pays the first deposit on the payments fake's page.
    await actAs('racer')
    await page.setViewportSize(PHONE)
    await page.goto(requestUrl, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="quote-total"]').innerText()).toBe('$10,000.00')
    await page.click('[data-test="accept-quote"]')
    await page.click('[data-test="confirm-yes"]')
    await page.waitForURL(/\/deals\/orders\/\d+$/)
    const orderUrl = page.url()
    expect(await scrollWidth()).toBeLessThanOrEqual(PHONE.width)
    await page.click('[data-test="pay-milestone"]')
    await page.waitForURL(/\/pay\/cs_test_/)
    await page.fill('input[name="name"]', 'Jonah Pelletier')
    await page.fill('input[name="cardNumber"]', CARDS.succeeds)
    await page.fill('input[name="expiry"]', '12/39')
    await page.fill('input[name="cvc"]', '123')
    await page.click('[data-test="fake-pay"]')
    await page.waitForURL(/\/deals\/orders\/\d+\/paid\?milestone=\d+&session=cs_test_/)
    await page.locator('[data-test="payment-return"][data-confirmed="true"]').waitFor({ timeout: 20_000 })

    // The shop marks the first milestone done with notes.
    await actAs('shop')
    await page.setViewportSize(PHONE)
    await page.goto(orderUrl, { waitUntil: 'networkidle' })
    const first = page.locator('[data-test="milestone"]').first()
    expect(await first.getAttribute('data-state')).toBe('funded')
    await first.locator('[data-test="open-submit"]').click()
    await first.getByLabel('Notes on the work').fill('Block bored, honed and decked; sheet in the thread.')
    await first.locator('[data-test="submit-milestone"]').click()
    await expect.poll(() => first.getAttribute('data-state'), { timeout: 15_000 }).toBe('submitted')
    expect(await scrollWidth()).toBeLessThanOrEqual(PHONE.width)

    // The racer approves it.
    await actAs('racer')
    await page.setViewportSize(PHONE)
    await page.goto(orderUrl, { waitUntil: 'networkidle' })
    await first.locator('[data-test="approve-milestone"]').click()
    await first.locator('[data-test="confirm-yes"]').click()
    await expect.poll(() => first.getAttribute('data-state'), { timeout: 15_000 }).toBe('released')

    // The shop starts a build and uploads a pull.
    await actAs('shop')
    await page.setViewportSize(PHONE)
    await page.goto(`${baseUrl()}/dashboard`, { waitUntil: 'networkidle' })
    await page.click('[data-test="new-build"]')
    await page.waitForURL(/\/dashboard\/builds\/new$/)
    await page.fill('[data-test="new-build-title"]', `Phone-built 383 ${Date.now().toString(36)}`)
    await page.click('[data-test="new-build-create"]')
    await page.waitForURL(/\/dashboard\/builds\/\d+$/)
    // The combination as a shop would type it (the pull's checks read bore, stroke and aspiration).
    const { injectorSizeLbHr: _s, injectorCount: _c, priceCents: _p, ...fields } = COMPLETE_COMBINATION
    for (const [key, value] of Object.entries(fields)) {
      const box = page.locator(`[data-test="field-${key}"]`)
      if (await box.evaluate(el => el.tagName) === 'SELECT') await box.selectOption(String(value))
      else await box.fill(String(value))
    }
    await page.click('[data-test="part-add"]')
    await page.locator('[data-test="part-row"]').first().getByLabel('Category, part 1').fill('Block')
    // The pull's checks read the saved combination: wait for the draft to be saved.
    await expect.poll(() => page.locator('[data-test="save-state"]').innerText(), { timeout: 10_000 }).toMatch(/Saved/)
    await page.fill('[data-test="pull-label"]', 'Final pull')
    await page.selectOption('[data-test="pull-standard"]', 'SAE_J1349_2004')
    await page.fill('[data-test="pull-baroInHg"]', '29.92')
    await page.fill('[data-test="pull-airTempF"]', '77')
    await page.fill('[data-test="pull-humidityPct"]', '20')
    await page.setInputFiles('[data-test="pull-file"]', { name: 'final-pull.csv', mimeType: 'text/csv', buffer: Buffer.from(inventedPullCsv(390, 520)) })
    await page.click('[data-test="pull-preview-button"]')
    await page.locator('[data-test="pull-preview"], [data-test="pull-message"]').first().waitFor()
    expect(await page.locator('[data-test="pull-message"]').allInnerTexts()).toEqual([])
    await page.click('[data-test="pull-save"]')
    await page.waitForSelector('[data-test="editor-pull"]')
    expect(await page.locator('[data-test="editor-pull-status"]').innerText()).toBe(VERIFICATION.awaiting)
    await page.waitForSelector('[data-test="editor-chart"] canvas')
    expect(await scrollWidth()).toBeLessThanOrEqual(PHONE.width)
  }, 180_000)
})
