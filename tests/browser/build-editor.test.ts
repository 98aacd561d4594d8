import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { bmepPsi, ciToLitres, convertCurve, displacementCi, hpToKw, parsePull, peaks, type CorrectionStandard } from '../../shared/engine'
import { evaluatePull } from '../../shared/pulls/evaluate'
import { partsTotalCents } from '../../shared/schemas/build'
import { PULL_STATUS_WORDS } from '../../shared/vocabulary'
import { DEMO_PASSWORD, PERSONAS } from '../support/auth'
import { isLocal, openBrowser } from '../support/browser'
import { baseUrl, testDb } from '../support/context'
import { buildIds, COMPLETE_COMBINATION, inventedPullCsv, removeBuildsSince } from '../support/builds'

let browser: Awaited<ReturnType<typeof openBrowser>>
let page: Page
let seeded: Set<number>
beforeAll(async () => {
  const { db, close } = await testDb()
  seeded = await buildIds(db)
  await close()
  browser = await openBrowser()
  page = browser.page
})
afterAll(async () => {
  await browser?.close()
  const { db, close } = await testDb()
  await removeBuildsSince(db, seeded)
  await close()
})

// The pull the shop uploads: an invented curve, declared under DIN 70020 on a warm, humid day.
const PULL_TEXT = inventedPullCsv(401, 545)
const WEATHER = { baroInHg: 29.12, airTempF: 84, humidityPct: 61 }
const DECLARED: CorrectionStandard = 'DIN_70020'
const PARTS = [
  { category: 'Block', part: 'Four-bolt main block, bored and honed', partNumber: 'BLK-4030', quantity: 1, price: '1899' },
  { category: 'Rotating assembly', part: 'Forged pistons', partNumber: 'PST-8', quantity: 8, price: '124.75' },
]
// A 1×1 PNG (signature, IHDR, IDAT, IEND).
const PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAQAAAC1HAwCAAAAC0lEQVR42mNkYAAAAAYAAjCB0C8AAAAASUVORK5CYII=', 'base64')
/** The first number in a text as shown ("1,234.5 hp" → 1234.5). */
const num = (text: string) => Number((/-?[\d,]*\.?\d+/.exec(text)?.[0] ?? 'NaN').replace(/,/g, ''))
let publishedSlug = ''

/** The module's own peak power for the uploaded pull under a standard (what every page must show). */
function modulePeakHp(standard: CorrectionStandard): number {
  const parsed = parsePull(PULL_TEXT)
  if (!parsed.ok) throw new Error('the invented pull should parse')
  return peaks(convertCurve(parsed.points, { standard: DECLARED, weather: WEATHER }, { standard, weather: WEATHER }).points).peakHp
}

async function fillField(key: string, value: string | number) {
  const box = page.locator(`[data-test="field-${key}"]`)
  if (await box.evaluate(el => el.tagName) === 'SELECT') await box.selectOption(String(value))
  else await box.fill(String(value))
}

describe('the build editor in Chromium', () => {
  it('a shop creates a build with a parts list, uploads a pull (progress, chart, check report) and publishes', async () => {
    await page.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' })
    await page.fill('#field-email', PERSONAS.shop)
    await page.fill('#field-password', DEMO_PASSWORD)
    await page.click('[data-test="password-form"] button[type="submit"]')
    await page.waitForURL(`${baseUrl()}/dashboard`)
    await page.click('[data-test="new-build"]')
    await page.waitForURL(/\/dashboard\/builds\/new$/)
    await page.fill('[data-test="new-build-title"]', 'Browser-built 383 street/strip')
    await page.click('[data-test="new-build-create"]')
    await page.waitForURL(/\/dashboard\/builds\/\d+$/)

    // The combination, with the computed figures following as the shop types.
    const { summary, injectorSizeLbHr: _s, injectorCount: _c, priceCents: _p, ...fields } = COMPLETE_COMBINATION
    await fillField('summary', summary)
    for (const [key, value] of Object.entries(fields)) await fillField(key, value)
    await fillField('priceCents', '14,500')
    const ci = displacementCi(COMPLETE_COMBINATION.boreIn, COMPLETE_COMBINATION.strokeIn, COMPLETE_COMBINATION.cylinders)
    await expect.poll(async () => num(await page.locator('[data-test="figure-displacement"]').innerText())).toBeCloseTo(ci, 1)
    expect(await page.locator('[data-test="figure-static-cr"]').innerText()).toMatch(/^\d+\.\d\d : 1$/)

    // The parts list: two rows, then the second moved to the top; the total in cents.
    for (const [i, part] of PARTS.entries()) {
      await page.click('[data-test="part-add"]')
      const row = page.locator('[data-test="part-row"]').nth(i)
      await row.locator('[data-test="part-category"]').fill(part.category)
      await row.locator('[data-test="part-name"]').fill(part.part)
      await row.locator('[data-test="part-number"]').fill(part.partNumber)
      await row.locator('[data-test="part-quantity"]').fill(String(part.quantity))
      await row.locator('[data-test="part-price"]').fill(part.price)
      await row.locator('[data-test="part-price"]').press('Tab')
    }
    await page.locator('[data-test="part-down"]').first().click()
    const total = partsTotalCents([{ quantity: 1, unitPriceCents: 189_900 }, { quantity: 8, unitPriceCents: 12_475 }])
    expect(num(await page.locator('[data-test="parts-total"]').innerText()) * 100).toBe(total)
    expect(await page.locator('[data-test="part-name"]').first().inputValue()).toBe(PARTS[1]!.part)
    await expect.poll(() => page.locator('[data-test="save-state"]').innerText(), { timeout: 10_000 }).toMatch(/Saved/)

    // The parts table fits its column, on a 1366 px desktop and on a 390 px phone (stacked rows): nothing
    // scrolls sideways inside it, and every field stays wide enough to type in (44 px, the product's rule).
    for (const viewport of [{ width: 1366, height: 900 }, { width: 390, height: 844 }]) {
      await page.setViewportSize(viewport)
      const fit = await page.locator('[data-test="editor-parts"]').evaluate((table) => {
        const boxes = [table, table.parentElement!, table.closest('section')!]
        return {
          overflow: boxes.filter(el => el.scrollWidth > el.clientWidth).map(el => `${el.tagName} ${el.scrollWidth}>${el.clientWidth}`),
          narrow: [...table.querySelectorAll('input')].filter(el => el.getBoundingClientRect().width < 44).map(el => el.getAttribute('aria-label')),
          page: document.documentElement.scrollWidth,
        }
      })
      expect(fit.overflow, `at ${viewport.width} px`).toEqual([])
      expect(fit.narrow, `at ${viewport.width} px`).toEqual([])
      expect(fit.page).toBeLessThanOrEqual(viewport.width)
      if (process.env.TW_SHOTS_DIR) await page.locator('[data-test="editor-parts"]').screenshot({ path: `${process.env.TW_SHOTS_DIR}/editor-parts-${viewport.width}.png` })
    }
    await page.setViewportSize({ width: 1280, height: 900 })

    // A photo, then the pull: preview first (errors by row or the report), then save.
    await page.setInputFiles('[data-test="photo-file"]', { name: 'on-the-stand.png', mimeType: 'image/png', buffer: PNG })
    await page.fill('[data-test="photo-caption"]', 'On the engine stand')
    await page.click('[data-test="photo-add"]')
    await page.waitForSelector('[data-test="editor-photo"]')

    await page.fill('[data-test="pull-label"]', 'Final pull, 34° timing')
    await page.selectOption('[data-test="pull-standard"]', DECLARED)
    await page.fill('[data-test="pull-baroInHg"]', String(WEATHER.baroInHg))
    await page.fill('[data-test="pull-airTempF"]', String(WEATHER.airTempF))
    await page.fill('[data-test="pull-humidityPct"]', String(WEATHER.humidityPct))
    // A file that is no pull is refused with the reason, and no bar claims it went through.
    await page.setInputFiles('[data-test="pull-file"]', { name: 'notes.csv', mimeType: 'text/csv', buffer: Buffer.from('these are my notes\nnot a pull\n') })
    await page.click('[data-test="pull-preview-button"]')
    await page.waitForSelector('[data-test="pull-message"]')
    expect(await page.locator('[data-test="upload-progress"]').count()).toBe(0)

    await page.setInputFiles('[data-test="pull-file"]', { name: 'final-pull.csv', mimeType: 'text/csv', buffer: Buffer.from(PULL_TEXT) })
    await page.click('[data-test="pull-preview-button"]')
    await page.waitForSelector('[data-test="pull-preview"]')
    expect(await page.locator('[data-test="upload-progress"]').isVisible()).toBe(true)
    expect(await page.locator('[data-test="upload-percent"]').innerText()).toBe('100 %')
    expect(await page.locator('[data-test="pull-preview"] [data-test="check-report"] li').count()).toBe(8)
    await page.waitForSelector('[data-test="pull-preview"] canvas')
    const evaluation = evaluatePull({ text: PULL_TEXT, declared: { standard: DECLARED }, weather: WEATHER, build: { id: null, aspiration: 'na', boreIn: 4.03, strokeIn: 3.75, cylinders: 8 } })
    if (!evaluation.ok) throw new Error('the invented pull should evaluate')
    expect(num(await page.locator('[data-test="preview-peak-hp"]').innerText())).toBeCloseTo(evaluation.summary.peakHp, 1)

    await page.click('[data-test="pull-save"]')
    await page.waitForSelector('[data-test="editor-pull"]')
    expect(await page.locator('[data-test="editor-pull-status"]').innerText()).toBe(PULL_STATUS_WORDS.submitted)
    await page.waitForSelector('[data-test="editor-chart"] canvas')
    expect(await page.locator('[data-test="editor-evidence"] [data-test="check-report"] li').count()).toBe(8)
    await expect.poll(async () => num(await page.locator('[data-test="figure-bmep"]').innerText())).toBeCloseTo(Math.round(bmepPsi(evaluation.summary.peakTq, ci)), 0)

    await page.click('[data-test="publish"]')
    await expect.poll(() => page.locator('[data-test="build-status"]').innerText()).toMatch(/published/i)
    publishedSlug = (await page.locator('[data-test="public-link"]').getAttribute('href'))!.replace('/builds/', '')
    expect(publishedSlug).toBe('browser-built-383-street-strip')
    expect(browser.requests.filter(url => !isLocal(url))).toEqual([])
  })

  it('a visitor opens it, switches standard and units, and the figures on screen equal the module\'s', async () => {
    expect(publishedSlug).not.toBe('')
    await browser.context.clearCookies()
    await page.goto(`${baseUrl()}/builds/${publishedSlug}`, { waitUntil: 'networkidle' })
    await page.evaluate(() => localStorage.clear())
    await page.reload({ waitUntil: 'networkidle' })
    const shown = async () => num(await page.locator('[data-test="peak-hp"]').innerText())
    expect(await shown()).toBeCloseTo(modulePeakHp('SAE_J1349_2004'), 1)
    expect(await page.locator('[data-test="figures-standard"]').innerText()).toContain('SAE J1349 (2004)')
    expect(await page.locator('[data-test="pull-status"]').first().innerText()).toBe(PULL_STATUS_WORDS.submitted)
    expect(await page.locator('[data-test="parts-table"] tbody tr').count()).toBe(2)
    expect(await page.locator('[data-test="build-photo"]').evaluate(img => (img as HTMLImageElement).naturalWidth)).toBe(1)

    await page.locator('[data-test="standard-picker"]').selectOption('SAE_J607')
    await page.waitForFunction(() => document.querySelector('[data-test="figures-standard"]')?.textContent?.includes('SAE J607'))
    // The label follows the URL at once; the figures follow when the recomputed curves arrive.
    await expect.poll(shown).toBeCloseTo(modulePeakHp('SAE_J607'), 1)

    await page.click('[data-test="units-toggle-metric"]')
    await expect.poll(() => page.locator('[data-test="peak-hp-unit"]').innerText()).toBe('kW')
    await expect.poll(shown).toBeCloseTo(hpToKw(modulePeakHp('SAE_J607')), 1)
    const ci = displacementCi(COMPLETE_COMBINATION.boreIn, COMPLETE_COMBINATION.strokeIn, COMPLETE_COMBINATION.cylinders)
    expect(num(await page.locator('[data-test="displacement"]').innerText())).toBeCloseTo(ciToLitres(ci), 2)
    await page.waitForSelector('[data-test="curves-chart"] canvas')
    expect(await page.locator('[data-test="curves-chart"]').first().getAttribute('data-power-unit')).toBe('kW')
    expect(await page.locator('[data-test="curves-chart"]').first().getAttribute('data-torque-unit')).toBe('N·m')
  })
})
