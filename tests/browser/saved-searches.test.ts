import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeAccount } from '../support/auth'
import { isLocal, openBrowser } from '../support/browser'
import { baseUrl, schema, testDb } from '../support/context'

let browser: Awaited<ReturnType<typeof openBrowser>>
let account: Awaited<ReturnType<typeof makeAccount>>
beforeAll(async () => {
  browser = await openBrowser()
  account = await makeAccount({ role: 'racer', name: 'Browser Saver' })
})
afterAll(async () => {
  await browser?.close()
  const { db, close } = await testDb()
  await db.delete(schema.savedSearches).where(eq(schema.savedSearches.userId, account.id))
  await close()
})

describe('saved searches in Chromium', () => {
  it('a signed-in racer saves a search from /search and finds it on the account page with its match count', async () => {
    const { page, requests } = browser
    await page.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' })
    await page.fill('#field-email', account.email)
    await page.fill('#field-password', account.password)
    await page.click('[data-test="password-form"] button[type="submit"]')
    await page.locator('[data-test="nav-account"]').waitFor()

    await page.goto(`${baseUrl()}/search?aspiration=supercharged&ciMin=300`, { waitUntil: 'networkidle' })
    await page.locator('[data-test="search-hit"]').first().waitFor()
    const total = Number((await page.locator('[data-test="search-total"]').innerText()).replace(/[^\d]/g, ''))
    expect(total).toBeGreaterThan(0)

    await page.locator('[data-test="search-save-open"]').click()
    const name = page.locator('#field-saved-search-name')
    // Prefilled from the filters.
    expect(await name.inputValue()).toBe('300+ ci · supercharged')
    await name.fill('Blown small blocks and up')
    await page.locator('[data-test="search-save-form"] button[type="submit"]').click()
    await page.locator('[data-test="search-saved"]').waitFor()
    expect(await page.locator('[data-test="search-saved"]').innerText()).toContain('Blown small blocks and up')

    await page.locator('[data-test="search-saved"] a').click()
    await page.waitForURL(/\/account#saved-searches$/)
    const item = page.locator('[data-test="saved-search"]')
    await item.first().waitFor()
    expect(await item.count()).toBe(1)
    expect(await item.locator('[data-test="saved-search-name"]').innerText()).toBe('Blown small blocks and up')
    expect(await item.locator('[data-test="saved-search-matches"]').innerText()).toBe(`${total} ${total === 1 ? 'build matches' : 'builds match'} now`)
    expect(await item.locator('[data-test="saved-search-email"]').isChecked()).toBe(true)

    // The link opens the search page on the same filters.
    await item.locator('[data-test="saved-search-open"]').click()
    await page.waitForURL(/\/search\?/)
    await page.locator('[data-test="search-hit"]').first().waitFor()
    expect(new URL(page.url()).searchParams.get('aspiration')).toBe('supercharged')
    expect(new URL(page.url()).searchParams.get('ciMin')).toBe('300')
    expect(requests.filter(url => !isLocal(url))).toEqual([])
  })
})
