import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { baseUrl } from '../support/context'
import { isLocal, openBrowser } from '../support/browser'

let browser: Awaited<ReturnType<typeof openBrowser>>
beforeAll(async () => {
  browser = await openBrowser()
})
afterAll(async () => {
  await browser?.close()
})

const totalOf = async (page: typeof browser.page) => Number((await page.locator('[data-test="search-total"]').innerText()).replace(/[^\d]/g, ''))

describe('search page in Chromium', () => {
  it('updates as the racer types and filters, shares its URL, and goes back', async () => {
    const { page, context, requests } = browser
    await page.goto(`${baseUrl()}/search`, { waitUntil: 'networkidle' })
    await page.locator('[data-test="search-hit"]').first().waitFor()
    const everything = await totalOf(page)
    expect(everything).toBeGreaterThan(10)

    await page.locator('[data-test="search-q"]').pressSequentially('superchar', { delay: 40 })
    await page.waitForURL(/[?&]q=superchar/)
    await page.waitForFunction(n => Number(document.querySelector('[data-test="search-total"]')?.textContent?.replace(/[^\d]/g, '')) < n, everything)
    const typed = await totalOf(page)
    const titles = await page.locator('[data-test="hit-title"]').allInnerTexts()
    expect(titles.length).toBe(Math.min(typed, 24))
    expect(titles.every(t => /supercharged/i.test(t))).toBe(true)

    const fuelFacet = page.locator('[data-test="facet-fuel"] label').filter({ has: page.locator('[data-test="facet-fuel-methanol"]') })
    const methanolCount = Number(await fuelFacet.locator('[data-test="facet-count"]').innerText())
    await page.locator('[data-test="facet-fuel-methanol"]').check()
    await page.waitForURL(/fuel=methanol/)
    await page.waitForFunction(n => Number(document.querySelector('[data-test="search-total"]')?.textContent?.replace(/[^\d]/g, '')) === n, methanolCount)
    const filteredTitles = await page.locator('[data-test="hit-title"]').allInnerTexts()
    expect(filteredTitles.every(t => /methanol/i.test(t))).toBe(true)

    const shared = page.url()
    const other = await context.newPage()
    await other.goto(shared, { waitUntil: 'networkidle' })
    expect(await totalOf(other)).toBe(methanolCount)
    expect(await other.locator('[data-test="hit-title"]').allInnerTexts()).toEqual(filteredTitles)
    expect(await other.locator('[data-test="facet-fuel-methanol"]').isChecked()).toBe(true)
    expect(await other.locator('[data-test="search-q"]').inputValue()).toBe('superchar')
    await other.close()

    await page.goBack()
    await page.waitForURL(url => !url.search.includes('fuel='))
    await page.waitForFunction(n => Number(document.querySelector('[data-test="search-total"]')?.textContent?.replace(/[^\d]/g, '')) === n, typed)
    expect(await page.locator('[data-test="facet-fuel-methanol"]').isChecked()).toBe(false)
    expect(page.url()).toContain('q=superchar')
    expect(requests.filter(url => !isLocal(url))).toEqual([])
  })

  it('keeps the racer\'s band, shows band power, and suggests which filter to widen when nothing matches', async () => {
    const { page } = browser
    await page.goto(`${baseUrl()}/search`, { waitUntil: 'networkidle' })
    await page.locator('[data-test="field-bandFrom"]').fill('4000')
    await page.locator('[data-test="field-bandFrom"]').blur()
    await page.locator('[data-test="field-bandTo"]').fill('6200')
    await page.locator('[data-test="field-bandTo"]').blur()
    await page.locator('[data-test="band-keep"]').click()
    await page.waitForURL(/bandFrom=4000&bandTo=6200|bandTo=6200.*bandFrom=4000|bandFrom=4000.*bandTo=6200/)
    await page.locator('[data-test="hit-band"]').first().waitFor()
    await page.locator('[data-test="search-sort"]').selectOption('band')
    await page.waitForURL(/sort=band/)
    await page.waitForLoadState('networkidle')
    const bandFigures = (await page.locator('[data-test="hit-band"]').allInnerTexts()).map(t => Number(t.replace(/[^\d.]/g, ''))).filter(n => n > 0)
    expect(bandFigures.length).toBeGreaterThan(3)
    expect(bandFigures).toEqual([...bandFigures].sort((a, b) => b - a))

    // A new visit without the band in the link finds it kept in this browser.
    await page.goto(`${baseUrl()}/search?aspiration=na`, { waitUntil: 'networkidle' })
    await page.waitForURL(/bandFrom=4000/)
    expect(await page.locator('[data-test="field-bandTo"]').inputValue()).toBe('6200')
    // ...and the results are asked again with it: the cards carry band power, not "pull too short" everywhere.
    await page.waitForFunction(() => [...document.querySelectorAll('[data-test="hit-band"]')].some(el => /\d/.test(el.textContent ?? '')), undefined, { timeout: 10_000 })

    await page.locator('[data-test="search-q"]').fill('zzyzx')
    await page.locator('[data-test="search-empty"]').waitFor()
    const widen = page.locator('[data-test="widen"]').filter({ hasText: 'Drop the words' })
    await widen.waitFor()
    await widen.click()
    await page.locator('[data-test="search-hit"]').first().waitFor()
    expect(await page.locator('[data-test="search-q"]').inputValue()).toBe('')
  })
  it('shows the cards and the number filters in the viewer\'s units, and keeps the filters in stored units', async () => {
    const { page } = browser
    // The shops panel keeps the racer's displacement range rather than 10 % around its middle.
    await page.goto(`${baseUrl()}/search?ciMin=400&ciMax=450&hpTarget=600`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="shops-for-target"]').innerText()).toContain('between 400 ci and 450 ci')

    await page.goto(`${baseUrl()}/search?ciMin=300&ciMax=500`, { waitUntil: 'networkidle' })
    await page.locator('[data-test="search-hit"]').first().waitFor()
    await page.click('[data-test="units-toggle-metric"]')
    await page.waitForFunction(() => document.querySelector('[data-test="unit-ciMin"]')?.textContent?.trim() === 'L')
    expect(await page.locator('[data-test="hit-peak"]').first().innerText()).toContain('kW')
    // 300 ci is 4.916 L (NIST SP 811: 1 in³ = 16.387064 cm³), shown to one decimal.
    expect(await page.locator('[data-test="field-ciMin"]').inputValue()).toBe('4.9')
    await page.locator('[data-test="field-ciMin"]').fill('5.7')
    await page.locator('[data-test="field-ciMin"]').blur()
    // 5.7 L = 5700 / 16.387064 = 347.8 ci, to a tenth.
    await page.waitForURL(/ciMin=347\.8/)
    expect(await page.locator('[data-test="field-ciMin"]').inputValue()).toBe('5.7')
    await page.click('[data-test="units-toggle-imperial"]')
    await page.waitForFunction(() => document.querySelector('[data-test="unit-ciMin"]')?.textContent?.trim() === 'ci')
    expect(await page.locator('[data-test="field-ciMin"]').inputValue()).toBe('347.8')
  })
  it('filters by the shop\'s region from its facet, with the count it showed', async () => {
    const { page } = browser
    await page.goto(`${baseUrl()}/search`, { waitUntil: 'networkidle' })
    const group = page.locator('[data-test="facet-region"]')
    const first = group.locator('label').first()
    const region = (await first.locator('input').getAttribute('data-test'))!.replace('facet-region-', '')
    const shown = Number(await first.locator('[data-test="facet-count"]').innerText())
    expect(shown).toBeGreaterThan(0)
    await first.locator('input').check()
    await page.waitForURL(/region=/)
    await page.waitForFunction(n => Number(document.querySelector('[data-test="search-total"]')?.textContent?.replace(/[^\d]/g, '')) === n, shown)
    const places = await page.locator('[data-test="search-hit"] p.text-sm').allInnerTexts()
    expect(places.length).toBeGreaterThan(0)
    for (const p of places) expect(p.endsWith(` · ${region}`)).toBe(true)
  })
})
