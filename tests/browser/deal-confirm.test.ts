// Actions that move money ask first, in Chromium: approving a milestone says what is paid out and to whom,
// and "Not yet" leaves the deposit held.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { submitMilestone } from '../../server/services/milestones'
import { PERSONAS } from '../support/auth'
import { openBrowser, signInPage } from '../support/browser'
import { baseUrl } from '../support/context'
import { dealTestContext, fundMilestone, makeOrder, milestoneRow } from '../support/deals'

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

describe('confirming a payout in Chromium', () => {
  it('asks with the amount before approving, moves nothing on "Not yet", and pays out on the yes', async () => {
    const { racer, shop, orderId, milestones } = await makeOrder(deal.ctx)
    const first = milestones[0]!
    await fundMilestone(deal.ctx, racer, first.id)
    await submitMilestone(deal.ctx, shop, first.id, { notes: 'Parts ordered; invoices attached to the thread.', proofFileIds: [], deliveryPullId: null })

    const { page } = browser
    await signInPage(page, PERSONAS.racer)
    await page.goto(`${baseUrl()}/deals/orders/${orderId}`, { waitUntil: 'networkidle' })
    const card = page.locator(`[data-test="milestone"][data-milestone-id="${first.id}"]`)
    await card.locator('[data-test="approve-milestone"]').click()
    const detail = await card.locator('[data-test="confirm-detail"]').innerText()
    // quoteInput's first milestone is $7,380.00 (tests/support/deals.ts).
    expect(detail).toContain('$7,380.00')
    expect(detail).toContain('released to the shop')
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-test'))).toBe('confirm')

    await card.locator('[data-test="confirm-no"]').click()
    expect(await card.locator('[data-test="confirm"]').count()).toBe(0)
    expect((await milestoneRow(deal.db, first.id)).state).toBe('submitted')

    await card.locator('[data-test="approve-milestone"]').click()
    await card.locator('[data-test="confirm-yes"]').click()
    await expect.poll(async () => (await milestoneRow(deal.db, first.id)).state, { timeout: 15_000 }).toBe('released')
  })
})
