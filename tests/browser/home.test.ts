import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { baseUrl, testDb, schema } from '../support/context'
import { isLocal, openBrowser } from '../support/browser'

let browser: Awaited<ReturnType<typeof openBrowser>>
beforeAll(async () => {
  browser = await openBrowser()
})
afterAll(async () => {
  await browser?.close()
})

describe('home page in Chromium', () => {
  it('lists seeded builds, opens a build page on click, and never leaves 127.0.0.1', async () => {
    const { page, requests } = browser
    const { db, close } = await testDb()
    const published = await db.select({ title: schema.builds.title }).from(schema.builds)
    await close()

    await page.goto(`${baseUrl()}/`, { waitUntil: 'networkidle' })
    const cards = page.locator('[data-test="build-card"]')
    expect(await cards.count()).toBeGreaterThanOrEqual(10)
    const firstTitle = (await cards.first().locator('h3').innerText()).trim()
    expect(published.map(b => b.title)).toContain(firstTitle)

    await cards.first().click()
    await page.waitForURL(/\/builds\/[a-z0-9-]+$/)
    await page.locator('[data-test="build-title"]').waitFor()
    expect((await page.locator('[data-test="build-title"]').innerText()).trim()).toBe(firstTitle)
    expect(await page.locator('[data-test="parts-table"] tbody tr').count()).toBeGreaterThan(5)
    expect(await page.locator('[data-test="displacement"]').innerText()).toMatch(/\d{3}\.\d\s*ci/)

    await page.locator('[data-test="shop-link"]').click()
    await page.waitForURL(/\/builders\/[a-z0-9-]+$/)
    await page.locator('[data-test="shop-name"]').waitFor()

    expect(requests.length).toBeGreaterThan(0)
    expect(requests.filter(url => !isLocal(url))).toEqual([])
  })
})
