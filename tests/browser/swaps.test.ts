// In Chromium: the swap results page for one change and band (figures as the API gives them, usable at
// 390 px, a common phone width — common practice), and one racer's class rules from /account to search
// and a build page.
import AxeBuilder from '@axe-core/playwright'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { displacementCi } from '../../shared/engine/geometry'
import { makeAccount } from '../support/auth'
import { openBrowser, signInPage } from '../support/browser'
import { api, baseUrl, schema, testDb } from '../support/context'

let browser: Awaited<ReturnType<typeof openBrowser>>
let racer: Awaited<ReturnType<typeof makeAccount>>
beforeAll(async () => {
  browser = await openBrowser()
  racer = await makeAccount({ role: 'racer', name: 'Class Racer' })
})
afterAll(async () => {
  await browser?.close()
  const { db, close } = await testDb()
  await db.delete(schema.classRules).where(eq(schema.classRules.userId, racer.id))
  await close()
})

const QUERY = 'change=camshaft&ciMin=300&ciMax=520&bandFrom=4000&bandTo=6500'
const signed = (hp: number) => `${hp > 0 ? '+' : hp < 0 ? '−' : ''}${Math.abs(hp).toFixed(1)} hp`

describe('the swap results page', () => {
  it('shows one change across one band as the API computes it: sample, method, median gains, curve table and links; fits 390 px', async () => {
    const { page } = browser
    const report = (await api(`/api/swaps?${QUERY}`)).body
    expect(report.count).toBeGreaterThan(0)
    await page.setViewportSize({ width: 1366, height: 900 })
    await page.goto(`${baseUrl()}/swaps?${QUERY}`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="swap-heading"]').innerText()).toBe('Camshaft across 4,000–6,500 rpm')
    expect(await page.locator('[data-test="swap-sample"]').innerText()).toContain(`${report.count} verified comparison`)
    expect(await page.locator('[data-test="swap-method"]').innerText()).toContain('SAE J1349 (2004)')
    expect(await page.locator('[data-test="swap-peak-median"]').innerText()).toBe(signed(report.peakGain.median))
    expect(await page.locator('[data-test="swap-band-median"]').innerText()).toBe(signed(report.bandGain.median))
    expect(await page.locator('[data-test="swap-link"]').count()).toBe(report.count)
    const chart = page.locator('[data-test="swap-curve"] canvas[role="img"]')
    expect(await chart.getAttribute('aria-label')).toContain('Median power change after camshaft')
    await page.locator('[data-test="swap-curve"] summary').click()
    expect(await page.locator('[data-test="swap-curve-table"] tbody tr').count()).toBe(report.curve.length)
    // The page's own content; the shared header and footer lie outside it.
    const axe = await new AxeBuilder({ page }).include('main').withTags(['wcag2a', 'wcag2aa']).analyze()
    expect(axe.violations.map(v => `${v.id}: ${v.nodes.length}`)).toEqual([])

    await page.setViewportSize({ width: 390, height: 844 })
    await page.goto(`${baseUrl()}/swaps?${QUERY}`, { waitUntil: 'networkidle' })
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390)
    await page.setViewportSize({ width: 1366, height: 900 })
  })

  it('follows the change picker into the URL and the figures', async () => {
    const { page } = browser
    await page.goto(`${baseUrl()}/swaps?${QUERY}`, { waitUntil: 'networkidle' })
    await page.selectOption('[data-test="swap-change"]', 'heads')
    await page.waitForURL(/change=heads/)
    await page.locator('[data-test="swap-heading"]', { hasText: 'Cylinder heads' }).waitFor()
    const report = (await api('/api/swaps?change=heads&ciMin=300&ciMax=520&bandFrom=4000&bandTo=6500')).body
    expect(await page.locator('[data-test="swap-sample"]').innerText()).toContain(`${report.count} verified comparison`)
  })
})

describe('a racer\'s class rules', () => {
  it('saved on /account, open search with them as filters and band, start a quote request, and cards and a build page name the rule a build breaks', async () => {
    const { page } = browser
    await signInPage(page, racer.email, racer.password)
    await page.goto(`${baseUrl()}/account#class-rules`, { waitUntil: 'networkidle' })
    const form = page.locator('[data-test="class-form"]')
    await form.locator('#field-displacementCapCi').fill('410')
    await form.locator('[data-test="class-fuel-pump_gas"]').check()
    await form.locator('#field-transmission').selectOption('automatic')
    await form.locator('#field-stallRpm').fill('4200')
    await form.locator('#field-shiftRpm').fill('6800')
    await form.locator('button[type="submit"]').click()
    await page.getByText('Your class rules are saved.').waitFor()

    await page.goto(`${baseUrl()}/search`, { waitUntil: 'networkidle' })
    await page.locator('[data-test="search-class-applied"]').waitFor()
    await page.waitForURL(/ciMax=410/)
    const url = new URL(page.url())
    expect(url.searchParams.get('fuel')).toBe('pump_gas')
    expect(url.searchParams.get('bandFrom')).toBe('4200')
    expect(url.searchParams.get('bandTo')).toBe('6800')
    await page.locator('[data-test="search-class-clear"]').click()
    await page.waitForURL(u => !u.searchParams.has('ciMax'))
    // Cleared filters list builds outside the class; their cards say which rule they break.
    const outside = page.locator('[data-test="hit-class-breaks"]').first()
    await outside.waitFor()
    expect(await outside.innerText()).toMatch(/^Outside your class: (over the 410 ci cap|fuel: )/)

    // A quote request starts from the rules.
    await page.goto(`${baseUrl()}/deals/new?builder=harrow-creek-engine-works`, { waitUntil: 'networkidle' })
    await page.locator('[data-test="request-from-class"]').waitFor()
    expect(await page.inputValue('[data-test="request-form"] [name="displacementCapCi"]')).toBe('410')
    expect(await page.inputValue('[data-test="request-form"] [name="fuel"]')).toBe('pump_gas')
    expect(await page.inputValue('[data-test="request-form"] [name="transmission"]')).toBe('automatic')
    expect(await page.inputValue('[data-test="request-form"] [name="stallRpm"]')).toBe('4200')

    // A published build over the cap on another fuel breaks two rules.
    const { db, close } = await testDb()
    const rows = await db.select().from(schema.builds).where(eq(schema.builds.status, 'published'))
    await close()
    const over = rows.find(b => displacementCi(b.boreIn!, b.strokeIn!, b.cylinders!) > 420 && b.fuel === 'e85')!
    expect(over).toBeTruthy()
    await page.goto(`${baseUrl()}/builds/${over.slug}`, { waitUntil: 'networkidle' })
    const cap = page.locator('[data-test="class-break-displacement"]')
    await cap.waitFor()
    expect(await cap.innerText()).toMatch(/^over the 410 ci cap \(\d+ ci\)$/)
    expect(await page.locator('[data-test="class-break-fuel"]').innerText()).toBe('fuel: E85 not allowed')
  })
})
