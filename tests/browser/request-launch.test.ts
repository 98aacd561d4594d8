// In Chromium: a racer whose class rules hold a manual car's launch rpm starts a quote request with it
// (the launch field in place of the converter stall), and the shop reads it on the request. The page
// stays axe clean and fits 390 px, a common phone width (common practice).
import AxeBuilder from '@axe-core/playwright'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { SHOP, makeAccount } from '../support/auth'
import { openBrowser, signInPage } from '../support/browser'
import { baseUrl, schema, testDb } from '../support/context'

let browser: Awaited<ReturnType<typeof openBrowser>>
let racer: Awaited<ReturnType<typeof makeAccount>>
beforeAll(async () => {
  browser = await openBrowser()
  racer = await makeAccount({ role: 'racer', name: 'Launch Racer' })
})
afterAll(async () => {
  await browser?.close()
  const { db, close } = await testDb()
  await db.delete(schema.classRules).where(eq(schema.classRules.userId, racer.id))
  await close()
})

describe('a manual car\'s launch rpm', () => {
  it('goes from the class rules into the quote request, and the request carries it to the shop', async () => {
    const { page } = browser
    await signInPage(page, racer.email, racer.password)
    await page.goto(`${baseUrl()}/account#class-rules`, { waitUntil: 'networkidle' })
    const rules = page.locator('[data-test="class-form"]')
    await rules.locator('#field-transmission').selectOption('manual')
    expect(await rules.locator('#field-stallRpm').count()).toBe(0)
    await rules.locator('#field-launchRpm').fill('3800')
    await rules.locator('#field-shiftRpm').fill('7200')
    await rules.locator('button[type="submit"]').click()
    await page.getByText('Your class rules are saved.').waitFor()

    await page.goto(`${baseUrl()}/deals/new?builder=${SHOP}`, { waitUntil: 'networkidle' })
    const form = page.locator('[data-test="request-form"]')
    await page.locator('[data-test="request-from-class"]').waitFor()
    expect(await form.locator('[name="transmission"]').inputValue()).toBe('manual')
    expect(await form.locator('[name="launchRpm"]').inputValue()).toBe('3800')
    expect(await form.locator('[name="stallRpm"]').count()).toBe(0)
    expect(await form.getByLabel('Launch rpm (optional)').inputValue()).toBe('3800')
    const axe = await new AxeBuilder({ page }).include('main').withTags(['wcag2a', 'wcag2aa']).analyze()
    expect(axe.violations.map(v => `${v.id}: ${v.nodes.length}`)).toEqual([])

    // An automatic asks for the stall instead; back to manual, the launch rpm is still there.
    await form.locator('[name="transmission"]').selectOption('automatic')
    expect(await form.locator('[name="launchRpm"]').count()).toBe(0)
    await form.locator('[name="stallRpm"]').waitFor()
    await form.locator('[name="transmission"]').selectOption('manual')
    expect(await form.locator('[name="launchRpm"]').inputValue()).toBe('3800')

    await page.setViewportSize({ width: 390, height: 844 })
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390)
    await page.setViewportSize({ width: 1280, height: 900 })

    const title = `Launch request ${Date.now().toString(36)}`
    await form.locator('input[name="title"]').fill(title)
    await form.locator('input[name="targetHp"]').fill('560')
    await form.locator('input[name="budgetMax"]').fill('24,000')
    await page.click('[data-test="request-submit"]')
    await page.waitForURL(/\/deals\/requests\/\d+$/)
    expect(await page.locator('[data-test="request-summary"]').innerText()).toContain('launches at 3,800 rpm')

    const id = Number(new URL(page.url()).pathname.split('/').pop())
    const { db, close } = await testDb()
    const [row] = await db.select({ transmission: schema.quoteRequests.transmission, launchRpm: schema.quoteRequests.launchRpm, stallRpm: schema.quoteRequests.stallRpm, shiftRpm: schema.quoteRequests.shiftRpm })
      .from(schema.quoteRequests).where(eq(schema.quoteRequests.id, id))
    await close()
    expect(row).toEqual({ transmission: 'manual', launchRpm: 3800, stallRpm: null, shiftRpm: 7200 })
  })
})
