// A racer finishes an order in Chromium (approves the last milestone, so it is paid out), reviews the
// shop on the order page, and finds the review and the shop's updated track record on its page, at
// desktop width and at 390 px without sideways scrolling.
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { approveMilestone, submitMilestone } from '../../server/services/milestones'
import { PERSONAS } from '../support/auth'
import { openBrowser, signInPage } from '../support/browser'
import { api, baseUrl } from '../support/context'
import { PEOPLE, dealTestContext, fundMilestone, makeOrder, milestoneRow, schema } from '../support/deals'

let browser: Awaited<ReturnType<typeof openBrowser>>
let deal: Awaited<ReturnType<typeof dealTestContext>>
beforeAll(async () => {
  browser = await openBrowser()
  deal = await dealTestContext()
})
afterAll(async () => {
  await browser?.close()
  await deal?.close()
})

describe('reviewing a finished order in Chromium', () => {
  it('lets the racer approve the last milestone, review the shop, and see the review and the new figures on the shop\'s page', async () => {
    const { racer, shop, orderId, milestones } = await makeOrder(deal.ctx)
    const before = (await api(`/api/builders/${PEOPLE.shopSlug}/record`)).body.record
    // The first two milestones go through as they do every day: paid, submitted, approved and paid out.
    for (const m of milestones.slice(0, 2)) {
      await fundMilestone(deal.ctx, racer, m.id)
      await submitMilestone(deal.ctx, shop, m.id, { notes: `Done: ${m.title}.`, proofFileIds: [], deliveryPullId: null })
      expect((await approveMilestone(deal.ctx, racer, m.id)).released).toBe(true)
    }
    const last = milestones[2]!
    await fundMilestone(deal.ctx, racer, last.id)
    await submitMilestone(deal.ctx, shop, last.id, { notes: 'Engine delivered with its dyno sheet.', proofFileIds: [], deliveryPullId: null })

    const { page } = browser
    await signInPage(page, PERSONAS.racer)
    await page.goto(`${baseUrl()}/deals/orders/${orderId}`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="review-form"]').count()).toBe(0)
    const card = page.locator(`[data-test="milestone"][data-milestone-id="${last.id}"]`)
    await card.locator('[data-test="approve-milestone"]').click()
    await card.locator('[data-test="confirm-yes"]').click()
    await expect.poll(async () => (await milestoneRow(deal.db, last.id)).state, { timeout: 15_000 }).toBe('released')

    // The order is complete: the form appears; a too-short text is refused in place, then the review goes out.
    const form = page.locator('[data-test="review-form"]')
    await form.waitFor({ timeout: 15_000 })
    await page.selectOption('#review-rating', '4')
    await page.selectOption('#review-aspect-communication', '5')
    await page.selectOption('#review-aspect-keptToQuote', '4')
    await page.fill('#field-body', 'Too short')
    await form.locator('button[type="submit"]').click()
    expect(await page.locator('[data-test="error-body"]').innerText()).toContain('at least 20 characters')
    const text = `Every milestone was explained in the thread before it was due; order ${orderId}.`
    await page.fill('#field-body', text)
    await form.locator('button[type="submit"]').click()
    await page.locator('[data-test="order-review"] [data-test="review-body"]').waitFor()
    expect(await page.locator('[data-test="order-review"] [data-test="review-body"]').innerText()).toBe(text)
    const rows = await deal.db.select().from(schema.reviews).where(eq(schema.reviews.orderId, orderId))
    expect(rows.map(r => [r.rating, r.aspects.communication, r.aspects.keptToQuote, r.aspects.powerVsTarget])).toEqual([[4, 5, 4, null]])

    // The shop's page: the review and the track record with the order counted.
    await page.goto(`${baseUrl()}/builders/${PEOPLE.shopSlug}`, { waitUntil: 'networkidle' })
    const reviews = page.locator('[data-test="shop-reviews"]')
    expect(await reviews.locator('[data-test="review-body"]').allInnerTexts()).toContain(text)
    const completed = await page.locator('[data-test="record-orders"] dd span').first().innerText()
    expect(Number(completed)).toBe(before.orders.completed + 1)
    const onTime = await page.locator('[data-test="record-on-time"]').innerText()
    expect(onTime).toContain(`of ${before.onTime.submitted + 3} submitted`)

    // The same page at 390 px: nothing scrolls sideways.
    await page.setViewportSize({ width: 390, height: 844 })
    await page.reload({ waitUntil: 'networkidle' })
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390)
    await page.goto(`${baseUrl()}/deals/orders/${orderId}`, { waitUntil: 'networkidle' })
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390)
    await page.goto(`${baseUrl()}/track-record/${PEOPLE.shopSlug}/on-time`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="record-items"] li').count()).toBe(before.onTime.submitted + 3)
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390)
    await page.setViewportSize({ width: 1280, height: 900 })
  })
})
