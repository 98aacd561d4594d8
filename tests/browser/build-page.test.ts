import { and, eq, isNotNull } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { convertCurve, parsePull, peaks, type CorrectionStandard } from '../../shared/engine'
import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { loadConfig } from '../../scripts/lib/config'
import { baseUrl, schema, testDb } from '../support/context'
import { makeBuildAwaitingCheck } from '../support/fixtures'
import { headlinePull } from '../../shared/pulls/headline'
import { PULL_STATUS_WORDS } from '../../shared/vocabulary'
import { isLocal, openBrowser } from '../support/browser'

let browser: Awaited<ReturnType<typeof openBrowser>>
beforeAll(async () => {
  browser = await openBrowser()
})
afterAll(async () => {
  await browser?.close()
})

describe('build page in Chromium', () => {
  it('shows the chart and switches standard with figures equal to the module\'s', async () => {
    const { db, close } = await testDb()
    const [first] = await db.select({ buildId: schema.builds.id }).from(schema.builds)
      .innerJoin(schema.dynoPulls, eq(schema.dynoPulls.buildId, schema.builds.id))
      .where(and(eq(schema.builds.status, 'published'), isNotNull(schema.dynoPulls.baroInHg)))
      .orderBy(schema.dynoPulls.id).limit(1)
    // The page headlines the pull the one rule picks (shared/pulls/headline.ts), not simply the first.
    const rows = await db.select({ slug: schema.builds.slug, pull: schema.dynoPulls, key: schema.files.storageKey }).from(schema.builds)
      .innerJoin(schema.dynoPulls, eq(schema.dynoPulls.buildId, schema.builds.id))
      .innerJoin(schema.files, eq(schema.files.id, schema.dynoPulls.fileId))
      .where(eq(schema.builds.id, first!.buildId))
    await close()
    // The page's headline pull (the one rule, over the pulls whose files can be read; other test files
    // add and break pulls of seeded builds), checked against the module from its raw file.
    const curves = await (await fetch(`${baseUrl()}/api/builds/${rows[0]!.slug}/curves`)).json() as { headlineId: number }
    const row = rows.find(r => r.pull.id === curves.headlineId)!
    expect(headlinePull([row.pull])?.pull.id).toBe(row.pull.id)
    const parsed = parsePull(readFileSync(resolve(loadConfig().dataDir, 'test-uploads', row.key), 'utf8'))
    if (!parsed.ok) throw new Error('stored pull does not parse')
    const weather = { baroInHg: row.pull.baroInHg!, airTempF: row.pull.airTempF!, humidityPct: row.pull.humidityPct! }
    const expectedPeak = (standard: CorrectionStandard) => peaks(convertCurve(parsed.points, { standard: row.pull.declaredStandard as CorrectionStandard, weather }, { standard, weather }).points).peakHp

    const { page, requests } = browser
    await page.goto(`${baseUrl()}/builds/${row.slug}`, { waitUntil: 'networkidle' })
    // The chart mounts on the client after hydration; wait for it rather than race it.
    await page.locator('canvas').first().waitFor()
    expect(await page.locator('canvas').count()).toBeGreaterThan(0)
    const shown = async () => Number((await page.locator('[data-test="peak-hp"]').innerText()).replace(/,/g, ''))
    expect(await shown()).toBeCloseTo(expectedPeak('SAE_J1349_2004'), 1)
    expect(await page.locator('[data-test="figures-standard"]').innerText()).toContain('SAE J1349 (2004)')

    await page.locator('[data-test="standard-picker"]').selectOption('DIN_70020')
    await page.waitForURL(/standard=DIN_70020/)
    await page.waitForFunction(() => document.querySelector('[data-test="figures-standard"]')?.textContent?.includes('DIN 70020'))
    // The label follows the URL at once; the figures follow when the curves under the new standard arrive.
    await expect.poll(shown).toBeCloseTo(expectedPeak('DIN_70020'), 1)
    expect([PULL_STATUS_WORDS.verified, PULL_STATUS_WORDS.submitted]).toContain(await page.locator('[data-test="pull-status"]').first().innerText())

    // Uncorrected is a choice: the shop gave the weather, so no "no weather" note appears.
    await page.locator('[data-test="standard-picker"]').selectOption('UNCORRECTED')
    await page.waitForURL(/standard=UNCORRECTED/)
    await page.waitForFunction(() => document.querySelector('[data-test="figures-standard"]')?.textContent?.includes('Uncorrected (as observed)'))
    await expect.poll(shown).toBeCloseTo(expectedPeak('UNCORRECTED'), 1)
    expect(await page.locator('[data-test="no-weather-note"]').count()).toBe(0)
    expect(requests.filter(url => !isLocal(url))).toEqual([])
  })

  it('prints a sheet that carries its address, the print date and each pull\'s checksum, with the raw file a click away', async () => {
    const list = await (await fetch(`${baseUrl()}/api/builds?perPage=1`)).json() as { items: { slug: string }[] }
    const slug = list.items[0]!.slug
    const curves = await (await fetch(`${baseUrl()}/api/builds/${slug}/curves`)).json() as { pulls: { id: number, sha256: string }[] }
    const { page } = browser
    await page.goto(`${baseUrl()}/builds/${slug}`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="pull-checksum"]').first().innerText()).toContain(curves.pulls[0]!.sha256)
    expect(await page.locator('[data-test="pull-raw"]').first().getAttribute('href')).toBe(`/api/builds/${slug}/pulls/${curves.pulls[0]!.id}/raw`)
    await page.emulateMedia({ media: 'print' })
    await page.evaluate(() => window.dispatchEvent(new Event('beforeprint')))
    const footer = page.locator('[data-test="print-footer"]')
    expect(await footer.isVisible()).toBe(true)
    const text = await footer.innerText()
    expect(text).toContain(`/builds/${slug}`)
    expect(text).toMatch(/Printed \w+ \d{1,2}, \d{4}/)
    await page.emulateMedia({ media: 'screen' })
    expect(await footer.isVisible()).toBe(false)
  })

  it('says the weather is unknown only for a pull the shop gave no weather for', async () => {
    const { db, close } = await testDb()
    const { slug, pullId } = await makeBuildAwaitingCheck(db)
    await db.update(schema.dynoPulls).set({ baroInHg: null, airTempF: null, humidityPct: null }).where(eq(schema.dynoPulls.id, pullId))
    await close()
    const { page } = browser
    await page.goto(`${baseUrl()}/builds/${slug}`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="no-weather-note"]').innerText()).toContain('no weather')
    expect(await page.locator('[data-test="figures-standard"]').innerText()).toContain('weather unknown')
  })

  it('overlays two builds on the compare page', async () => {
    const { page } = browser
    const list = await (await fetch(`${baseUrl()}/api/builds?perPage=2`)).json() as { items: { slug: string, title: string }[] }
    await page.goto(`${baseUrl()}/compare?builds=${list.items[0]!.slug}`, { waitUntil: 'networkidle' })
    await page.locator('[data-test="compare-add"]').selectOption(list.items[1]!.slug)
    await page.waitForURL(new RegExp(`builds=${list.items[0]!.slug}(%2C|,)${list.items[1]!.slug}`))
    await page.waitForFunction(() => document.querySelectorAll('[data-test="compare-table"] tbody tr').length === 2)
    const rows = await page.locator('[data-test="compare-table"] tbody tr').allInnerTexts()
    expect(rows[0]).toContain(list.items[0]!.title)
    expect(rows[1]).toContain(list.items[1]!.title)
    // Price and the combinations side by side, one column per build.
    expect(await page.locator('[data-test="compare-price"]').count()).toBe(2)
    const combination = await page.locator('[data-test="compare-combination"]').innerText()
    expect(combination).toContain('Bore × stroke')
    expect(combination).toContain('Cylinder heads')
    expect(await page.locator('canvas').count()).toBeGreaterThan(0)
  })
})
