import { and, count, eq, isNotNull } from 'drizzle-orm'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { DEMO_PASSWORD, makeAccount, PERSONAS, waitForMail } from '../support/auth'
import { isLocal, openBrowser } from '../support/browser'
import { baseUrl, schema, testDb } from '../support/context'
import { makeBuildAwaitingCheck, makeSubmittedPull, shopOf } from '../support/fixtures'

let browser: Awaited<ReturnType<typeof openBrowser>>
let page: Page
beforeAll(async () => {
  browser = await openBrowser()
  page = browser.page
})
afterAll(async () => {
  await browser?.close()
})
beforeEach(async () => {
  await browser.context.clearCookies()
})

async function signInAsAdmin() {
  await page.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' })
  await page.fill('#field-email', PERSONAS.admin)
  await page.fill('#field-password', DEMO_PASSWORD)
  await page.click('[data-test="password-form"] button[type="submit"]')
  await page.waitForURL(`${baseUrl()}/admin`)
}

async function openReview(pullId: number) {
  await page.click('[data-test="admin-nav-evidence"]')
  await page.waitForURL(`${baseUrl()}/admin/evidence`)
  await page.locator(`[data-test="queue-row-${pullId}"] [data-test="queue-open"]`).click()
  await page.waitForURL(`${baseUrl()}/admin/evidence/${pullId}`)
  await page.locator('[data-test="review-title"]').waitFor()
}

describe('the admin desk in Chromium', () => {
  it('an admin verifies a pull, and the verified mark appears on the build page, in the build lists and in search results', async () => {
    const owner = await makeAccount({ role: 'builder' })
    const { db, close } = await testDb()
    const { pullId, slug, title, pullLabel } = await makeBuildAwaitingCheck(db, { shopId: (await shopOf(db, owner.id)).id })
    const [{ n: waiting }] = await db.select({ n: count() }).from(schema.dynoPulls).where(eq(schema.dynoPulls.status, 'submitted')) as [{ n: number }]
    await close()

    await page.goto(`${baseUrl()}/builds/${slug}`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="verified-mark"]').count()).toBe(0)

    await signInAsAdmin()
    expect(await page.locator('[data-test="figure-queue"] [data-test="figure-value"]').innerText()).toBe(String(waiting))
    await openReview(pullId)
    expect(await page.locator('[data-test="review-title"]').innerText()).toBe(pullLabel)
    await page.locator('canvas').first().waitFor()
    expect(await page.locator('[data-test^="check-"]').count()).toBe(8)
    expect((await page.locator('[data-test="raw-preview"]').innerText()).split('\n')[0]).toBe('rpm,torque_lbft,power_hp')
    expect(await page.locator('[data-test="figures-compare"]').innerText()).toContain('SAE J1349 (2004)')

    page.once('dialog', d => void d.accept())
    await page.click('[data-test="approve-form"] button[type="submit"]')
    await page.locator('[data-test="decision-done"]').waitFor()
    expect(await page.locator('[data-test="decision-done"]').innerText()).toContain('Verified')

    await page.goto(`${baseUrl()}/builds/${slug}`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="verified-mark"]').first().isVisible()).toBe(true)
    // The shop's profile lists its builds as cards.
    await page.goto(`${baseUrl()}/builders/${owner.shopSlug}`, { waitUntil: 'networkidle' })
    const card = page.locator('[data-test="build-card"]', { hasText: title })
    expect(await card.locator('[data-test="verified-mark"]').count()).toBe(1)
    // The decision reaches the search index at once: the search page's hit carries the mark.
    await page.goto(`${baseUrl()}/search?q=${encodeURIComponent(title)}`, { waitUntil: 'networkidle' })
    const hit = page.locator('[data-test="search-hit"]', { hasText: title })
    await hit.waitFor()
    expect(await hit.locator('[data-test="verified-mark"]').count()).toBe(1)
    expect(browser.requests.filter(url => !isLocal(url))).toEqual([])
  })

  it('a rejection with its reason reaches the shop\'s inbox', async () => {
    const owner = await makeAccount({ role: 'builder', name: 'Petra Linwood' })
    const { db, close } = await testDb()
    const { pullId, pullLabel } = await makeBuildAwaitingCheck(db, { shopId: (await shopOf(db, owner.id)).id })
    await close()

    await signInAsAdmin()
    await openReview(pullId)
    await page.click('[data-test="reject-form"] button[type="submit"]')
    expect(await page.locator('[data-test="error-reason"]').innerText()).toContain('Write what is wrong with the pull')

    const reason = 'The rpm column repeats every value twice; send the file straight from the dyno.'
    await page.fill('#field-reason', reason)
    await page.click('[data-test="reject-form"] button[type="submit"]')
    await page.locator('[data-test="decision-done"]').waitFor()
    expect(await page.locator('main').innerText()).toContain(`e-mailed to ${owner.email}`)

    const mail = await waitForMail(owner.email, m => m.subject.includes(pullLabel))
    expect(mail.text).toContain('Hello Petra Linwood')
    expect(mail.text).toContain(reason)
  })
  it('the review of a rejected pull on a verified build says the pull was rejected, not that it carries the verified mark', async () => {
    const { db, close } = await testDb()
    const [seeded] = await db.select({ slug: schema.builds.slug }).from(schema.builds)
      .where(and(eq(schema.builds.status, 'published'), isNotNull(schema.builds.verifiedAt))).limit(1)
    const { pullId } = await makeSubmittedPull(db, seeded!.slug)
    await close()

    await signInAsAdmin()
    await page.goto(`${baseUrl()}/admin/evidence/${pullId}`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="pull-decision"]').innerText()).toContain('awaiting verification')
    await page.fill('#field-reason', 'The weather on the sheet does not match the file; send the sheet from that day.')
    await page.click('[data-test="reject-form"] button[type="submit"]')
    await page.locator('[data-test="decision-done"]').waitFor()
    await page.reload({ waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="pull-decision"]').innerText()).toContain('rejected')
    expect(await page.locator('header [data-test="verified-mark"]').count()).toBe(0)
    expect(await page.locator('[data-test="build-verified-elsewhere"]').isVisible()).toBe(true)
  })
})
