import { and, eq, isNotNull } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { convertCurve, parsePull, peaks, type CorrectionStandard } from '../../shared/engine'
import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { loadConfig } from '../../scripts/lib/config'
import { baseUrl, schema, testDb } from '../support/context'
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
    const [row] = await db.select({ slug: schema.builds.slug, pull: schema.dynoPulls, key: schema.files.storageKey }).from(schema.builds)
      .innerJoin(schema.dynoPulls, eq(schema.dynoPulls.buildId, schema.builds.id))
      .innerJoin(schema.files, eq(schema.files.id, schema.dynoPulls.fileId))
      .where(and(eq(schema.builds.status, 'published'), isNotNull(schema.dynoPulls.baroInHg)))
      .orderBy(schema.dynoPulls.id).limit(1)
    await close()
    const parsed = parsePull(readFileSync(resolve(loadConfig().dataDir, 'test-uploads', row!.key), 'utf8'))
    if (!parsed.ok) throw new Error('stored pull does not parse')
    const weather = { baroInHg: row!.pull.baroInHg!, airTempF: row!.pull.airTempF!, humidityPct: row!.pull.humidityPct! }
    const expectedPeak = (standard: CorrectionStandard) => peaks(convertCurve(parsed.points, { standard: row!.pull.declaredStandard as CorrectionStandard, weather }, { standard, weather }).points).peakHp

    const { page, requests } = browser
    await page.goto(`${baseUrl()}/builds/${row!.slug}`, { waitUntil: 'networkidle' })
    // The chart mounts on the client after hydration; wait for it rather than race it.
    await page.locator('canvas').first().waitFor()
    expect(await page.locator('canvas').count()).toBeGreaterThan(0)
    const shown = async () => Number((await page.locator('[data-test="peak-hp"]').innerText()).replace(/,/g, ''))
    expect(await shown()).toBeCloseTo(expectedPeak('SAE_J1349_2004'), 1)
    expect(await page.locator('[data-test="figures-standard"]').innerText()).toContain('SAE J1349 (2004)')

    await page.locator('[data-test="standard-picker"]').selectOption('DIN_70020')
    await page.waitForURL(/standard=DIN_70020/)
    await page.waitForFunction(() => document.querySelector('[data-test="figures-standard"]')?.textContent?.includes('DIN 70020'))
    expect(await shown()).toBeCloseTo(expectedPeak('DIN_70020'), 1)
    expect(await page.locator('[data-test="pull-status"]').first().innerText()).toMatch(/Checked|Awaiting/)
    expect(requests.filter(url => !isLocal(url))).toEqual([])
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
    expect(await page.locator('canvas').count()).toBeGreaterThan(0)
  })
})
