// The shop's delivery pull on a guaranteed milestone, in Chromium: checked once, reported once, in words.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { PERSONAS } from '../support/auth'
import { openBrowser, signInPage } from '../support/browser'
import { baseUrl } from '../support/context'
import { dealTestContext, fundMilestone, makeOrder } from '../support/deals'
import { inventedPullCsv } from '../support/builds'

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

const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)

describe('a delivery pull in Chromium', () => {
  it('shows one report for the checked pull, titled in words, before and after the page is opened again', async () => {
    // One guaranteed milestone for the whole quote ($24,600.00, the line items of quoteInput).
    const { racer, orderId, milestones } = await makeOrder(deal.ctx, {
      quote: {
        milestones: [{ title: 'Engine on the dyno', deliverable: 'Finished engine and its delivery pull', amountCents: 2_460_000, dueDate: inDays(90) }],
        guarantee: { hp: 480, tolerancePct: 3, standard: 'SAE_J1349_2004' },
      },
    })
    await fundMilestone(deal.ctx, racer, milestones[0]!.id)

    const { page } = browser
    await signInPage(page, PERSONAS.shop)
    await page.goto(`${baseUrl()}/deals/orders/${orderId}`, { waitUntil: 'networkidle' })
    await page.click('[data-test="open-submit"]')
    const form = page.locator('[data-test="delivery-pull-form"]')
    await form.locator('[data-test="file-input"]').setInputFiles({ name: 'delivery.csv', mimeType: 'text/csv', buffer: Buffer.from(inventedPullCsv(77, 540)) })
    await form.locator('[data-test="uploaded-file"]').first().waitFor()
    await form.locator('input[name="baroInHg"]').fill('29.4')
    await form.locator('input[name="airTempF"]').fill('72')
    await form.locator('input[name="humidityPct"]').fill('40')
    await form.locator('input[name="boreIn"]').fill('4.03')
    await form.locator('input[name="strokeIn"]').fill('3.75')
    await form.getByRole('button', { name: 'Check the pull' }).click()
    await form.locator('[data-test="delivery-report"]').waitFor()
    const title = await form.locator('[data-test="delivery-report"] p').first().innerText()
    expect(title).toMatch(/^Delivery pull: /)
    expect(title).not.toContain('the delivery pull')
    // Its curve under the quoted standard is drawn beside the report.
    await form.locator('[data-test="delivery-curve"] canvas').waitFor()
    // The order page polls: after its next refresh, with the pull now on the milestone, the report is still shown once.
    await page.waitForResponse(r => r.url().includes(`/api/orders/${orderId}`) && r.status() === 200)
    await page.waitForLoadState('networkidle')
    expect(await page.locator('[data-test="delivery-report"]').count()).toBe(1)

    await page.reload({ waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="delivery-report"]').count()).toBe(1)
    await page.locator('[data-test="delivery-curve"] canvas').waitFor()
    // The history names the standard in words, not by its stored code.
    const history = await page.locator('[data-test="order-history"]').innerText()
    expect(history).toContain('Delivery pull checked')
    expect(history).toContain('SAE J1349 (2004)')
    expect(history).not.toContain('SAE_J1349_2004')
    await page.click('[data-test="open-submit"]')
    expect(await page.locator('[data-test="delivery-report"]').count()).toBe(1)
  })
})
