// The notifications page in Chromium: a racer sees the shop's quote unread with the header's badge,
// marks all read with the keyboard and the badge goes; the e-mail switches are labelled checkboxes;
// at 390 px wide (a common phone width, common practice) nothing scrolls sideways.
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadActor, type DealContext } from '../../server/services/deal-context'
import { createRequest, sendQuote } from '../../server/services/deals'
import { makeAccount } from '../support/auth'
import { isLocal, openBrowser } from '../support/browser'
import { baseUrl } from '../support/context'
import { dealTestContext, quoteInput, requestInput, schema } from '../support/deals'

let browser: Awaited<ReturnType<typeof openBrowser>>
let ctx: DealContext
let close: () => Promise<void>
beforeAll(async () => {
  browser = await openBrowser()
  ;({ ctx, close } = await dealTestContext())
})
afterAll(async () => {
  await browser?.close()
  await close()
})

describe('notifications in Chromium', () => {
  it('a racer sees the shop\'s quote unread, marks all read, and the header\'s badge goes; it fits 390 px', async () => {
    const racer = await makeAccount({ role: 'racer', name: 'Bell Racer' })
    const shop = await makeAccount({ role: 'builder', name: 'Bell Shop' })
    const title = `Bell deal ${Date.now().toString(36)}`
    const { id: requestId } = await createRequest(ctx, (await loadActor(ctx.db, racer.id))!, requestInput({ shop: shop.shopSlug!, title }))
    await sendQuote(ctx, (await loadActor(ctx.db, shop.id))!, requestId, quoteInput())

    const { page, requests } = browser
    await page.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' })
    await page.fill('#field-email', racer.email)
    await page.fill('#field-password', racer.password)
    await page.click('[data-test="password-form"] button[type="submit"]')
    await page.locator('[data-test="nav-account"]').waitFor()

    const badge = page.locator('[data-test="nav-notifications-unread"]')
    await badge.waitFor()
    expect(await badge.innerText()).toBe('1')
    expect(await page.locator('[data-test="nav-notifications"]').getAttribute('aria-label')).toBe('Notifications, 1 unread')

    await page.locator('[data-test="nav-notifications"]').click()
    await page.waitForURL(/\/notifications$/)
    const item = page.locator('[data-test="notification"]')
    await item.first().waitFor()
    expect(await item.count()).toBe(1)
    expect(await item.first().getAttribute('data-unread')).toBe('true')
    expect(await item.first().locator('[data-test="notification-words"]').innerText()).toBe('Quote sent')
    expect(await item.first().locator('[data-test="notification-link"]').innerText()).toBe(title)
    expect(await item.first().locator('[data-test="notification-link"]').getAttribute('href')).toBe(`/deals/requests/${requestId}`)
    expect(await page.locator('[data-test="notifications-unread"]').innerText()).toBe('1 unread')

    // The button is reached and pressed from the keyboard.
    await page.locator('[data-test="notifications-mark-all"]').focus()
    await page.keyboard.press('Enter')
    await page.locator('[data-test="notifications-mark-all"]').waitFor({ state: 'detached' })
    await expect.poll(() => item.first().getAttribute('data-unread')).toBe('false')
    await badge.waitFor({ state: 'detached' })
    expect(await page.locator('[data-test="nav-notifications"]').getAttribute('aria-label')).toBe('Notifications')
    expect(await page.locator('[data-test="notifications-unread"]').innerText()).toBe('Nothing unread.')

    // The switches are checkboxes found by their labels; Space turns one off and the server keeps it.
    const quotes = page.getByLabel('Quotes')
    expect(await quotes.isChecked()).toBe(true)
    await quotes.focus()
    await page.keyboard.press('Space')
    await expect.poll(async () => {
      const [row] = await ctx.db.select().from(schema.notificationSettings).where(eq(schema.notificationSettings.userId, racer.id))
      return row?.emailOff
    }).toEqual(['quotes'])
    expect(await quotes.isChecked()).toBe(false)

    // A racer is never sent new-request mail, so that switch is a shop's alone.
    expect(await page.locator('[data-test="email-switch-requests"]').count()).toBe(0)

    // A phone's width: the page and the header fit without sideways scrolling.
    await page.setViewportSize({ width: 390, height: 844 })
    await page.reload({ waitUntil: 'networkidle' })
    await item.first().waitFor()
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390)
    expect(requests.filter(url => !isLocal(url))).toEqual([])
  })
})
