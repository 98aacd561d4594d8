// A dispute settled in Chromium: the admin finds it from the overview, reads the thread beside the
// milestone's proof and payments, refunds the racer with a note (after the confirm step), and the
// racer's order page shows the outcome with the note.
import { count, eq } from 'drizzle-orm'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PASSWORD, PERSONAS } from '../support/auth'
import { isLocal, openBrowser } from '../support/browser'
import { baseUrl, schema, testDb } from '../support/context'
import { dealTestContext, makeDispute } from '../support/deals'

let browser: Awaited<ReturnType<typeof openBrowser>>
let page: Page
beforeAll(async () => {
  browser = await openBrowser()
  page = browser.page
})
afterAll(async () => {
  await browser?.close()
})

async function signIn(email: string) {
  await browser.context.clearCookies()
  await page.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' })
  await page.fill('#field-email', email)
  await page.fill('#field-password', DEMO_PASSWORD)
  await page.click('[data-test="password-form"] button[type="submit"]')
  await page.locator('[data-test="nav-account"]').waitFor()
}

describe('disputes in Chromium', () => {
  it('an admin reads the thread beside the proof, refunds with a note, and the racer\'s order page shows it', async () => {
    const { ctx, close } = await dealTestContext()
    const d = await makeDispute(ctx).finally(close)
    const { db, close: done } = await testDb()
    const [{ n: open }] = await db.select({ n: count() }).from(schema.milestones).where(eq(schema.milestones.state, 'disputed')) as [{ n: number }]
    await done()

    await signIn(PERSONAS.admin)
    await page.waitForURL(`${baseUrl()}/admin`)
    expect(await page.locator('[data-test="figure-disputes"] [data-test="figure-value"]').innerText()).toBe(String(open))
    await page.click('[data-test="admin-nav-disputes"]')
    await page.waitForURL(`${baseUrl()}/admin/disputes`)
    await page.locator(`[data-test="dispute-row-${d.milestone.id}"] [data-test="dispute-open"]`).click()
    await page.waitForURL(`${baseUrl()}/admin/disputes/${d.milestone.id}`)
    expect(await page.locator('[data-test="dispute-title"]').innerText()).toBe(d.title)

    // The thread on one side, the milestone with its proof and the payments on the other.
    const thread = await page.locator('[data-test="dispute-thread"]').innerText()
    expect(thread).toContain(d.message)
    expect(thread).toContain(d.reason)
    expect(await page.locator('[data-test="dispute-reason"]').innerText()).toContain(d.reason)
    expect(await page.locator('[data-test="dispute-proof-notes"]').innerText()).toBe(d.notes)
    expect(await page.locator('[data-test="dispute-proof"] [data-test="file-link"]').getAttribute('href')).toBe(`/api/attachments/${d.proofFileId}`)
    expect(await page.locator('[data-test="payment-row"]').first().innerText()).toMatch(/cs_test_\w+/)

    // A decision needs a note, then a confirmation.
    await page.click('[data-test="outcome-refund"]')
    await page.click('[data-test="settle-form"] button[type="submit"]')
    expect(await page.locator('[data-test="error-note"]').innerText()).toContain('at least 10 characters')
    const note = `The invoice shows a cast crank where the quote promised forged (${d.milestone.id}).`
    await page.fill('#field-note', note)
    await page.click('[data-test="settle-form"] button[type="submit"]')
    expect(await page.locator('[data-test="settle-confirm"]').innerText()).toContain('Refund')
    await page.click('[data-test="settle-form"] button[type="submit"]')
    await page.locator('[data-test="settle-done"]').waitFor()
    expect(await page.locator('[data-test="settle-done"]').innerText()).toContain('Refunded to the racer')
    expect(await page.locator('[data-test="settle-form"]').count()).toBe(0)

    // The racer sees the outcome and the note on the order page.
    await signIn(PERSONAS.racer)
    await page.goto(`${baseUrl()}/deals/orders/${d.orderId}`, { waitUntil: 'networkidle' })
    const card = page.locator(`[data-test="milestone"][data-milestone-id="${d.milestone.id}"]`)
    expect(await card.getAttribute('data-state')).toBe('refunded')
    expect(await card.locator('[data-test="dispute-settled"]').getAttribute('data-outcome')).toBe('refund')
    expect(await card.locator('[data-test="dispute-settled"]').innerText()).toContain(note)
    expect(browser.requests.filter(url => !isLocal(url))).toEqual([])
  })
})
