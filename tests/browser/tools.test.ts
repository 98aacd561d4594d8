import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import {
  airflowCfm, bmepKpa, bmepPsi, camEvents, cToF, ciToLitres, correctionValidity, displacementCi, dynamicCompressionRatio, fuelDefaults,
  hpFromTorque, hpPerCi, injectorSizeLbHr, kwFromNm, lbHrToCcMin, kpaToInHg, meanPistonSpeedFtMin, mmToIn, rodStrokeRatio,
  SEAT_CLOSING_OFFSET_DEG, STANDARD_LIMITS, staticCompressionRatio, type CamEvents, type CorrectionStandard,
} from '../../shared/engine'
import { baseUrl } from '../support/context'
import { isLocal, openBrowser } from '../support/browser'

let browser: Awaited<ReturnType<typeof openBrowser>>
beforeAll(async () => {
  browser = await openBrowser()
})
afterAll(async () => {
  await browser?.close()
})

/** A module figure as the page writes it (en-US digits, fixed decimals). */
const shown = (value: number, digits: number) => value.toLocaleString('en-US', { minimumFractionDigits: digits, maximumFractionDigits: digits })

const at = (test: string) => browser.page.locator(`[data-test="${test}"]`)
const text = async (test: string) => (await at(test).innerText()).trim()
const value = async (test: string) => Number(await at(test).inputValue())
async function fill(entries: Record<string, string | number>) {
  for (const [test, v] of Object.entries(entries)) await at(test).fill(String(v))
}
/** Waits until the figure on screen reads as the module's value at the page's precision. */
async function expectFigure(test: string, expected: number, digits: number) {
  await expect.poll(() => text(test), { timeout: 5000 }).toBe(shown(expected, digits))
}
/**
 * Typing before Vue has hydrated a calculator would be overwritten: wait for the mounted app and for
 * every card to be live (each hydrates on its own once the page is idle; ToolsCard sets data-live).
 */
async function hydrated() {
  await browser.page.waitForFunction(() => Boolean((document.querySelector('#__nuxt') as { __vue_app__?: unknown } | null)?.__vue_app__))
  await browser.page.waitForFunction(() => {
    const cards = [...document.querySelectorAll('[data-test$="-card"]')]
    return cards.length === 8 && cards.every(card => card.hasAttribute('data-live'))
  })
}
/** The page as a new anonymous visitor sees it: imperial (the unit choice an earlier test left in this browser is cleared). */
async function openTools() {
  const { page } = browser
  await page.goto(`${baseUrl()}/tools`)
  // The key stores/units.ts keeps an anonymous visitor's choice under.
  await page.evaluate(() => localStorage.removeItem('torquewright.units'))
  await page.reload({ waitUntil: 'networkidle' })
  await hydrated()
  await expect.poll(() => at('tools-units-imperial').getAttribute('aria-checked')).toBe('true')
}

describe('calculators page in Chromium', () => {
  it('is linked from the header; displacement, compression and power equal the module\'s, in imperial and after a switch to metric', async () => {
    const { page } = browser
    await page.goto(`${baseUrl()}/`, { waitUntil: 'networkidle' })
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Calculators' }).click()
    await page.waitForURL(/\/tools$/)
    await hydrated()

    const engine = { boreIn: 4.125, strokeIn: 4, cylinders: 8, rodLengthIn: 6.125 }
    await fill({ 'displacement-boreIn': '4.125', 'displacement-strokeIn': '4.000', 'displacement-cylinders': '8', 'displacement-rodLengthIn': '6.125' })
    const ci = displacementCi(engine.boreIn, engine.strokeIn, engine.cylinders)
    await expectFigure('displacement-ci', ci, 1)
    await expectFigure('displacement-litres', ciToLitres(ci), 2)
    await expectFigure('displacement-rod-ratio', rodStrokeRatio(engine.rodLengthIn, engine.strokeIn), 3)

    const heads = { chamberCc: 70, pistonCc: -4.5, gasketBoreIn: 4.2, gasketThicknessIn: 0.041, deckClearanceIn: 0, intakeClosesAbdcDeg: 42 }
    await fill({
      'compression-boreIn': '4.125', 'compression-strokeIn': '4.000', 'compression-rodLengthIn': '6.125', 'compression-chamberCc': '70',
      'compression-pistonCc': '-4.5', 'compression-gasketBoreIn': '4.200', 'compression-gasketThicknessIn': '0.041',
      'compression-deckClearanceIn': '0', 'compression-intakeClosesAbdcDeg': '42',
    })
    await expectFigure('compression-static', staticCompressionRatio({ ...engine, ...heads }), 2)
    // The page starts on 0.050 in timing: the closing is moved to the seat (+15°, common practice) and the figure says so.
    await expectFigure('compression-dynamic', dynamicCompressionRatio({ ...engine, ...heads, timingBasis: 'lift050' }), 2)
    await expectFigure('compression-seat-closing', 42 + SEAT_CLOSING_OFFSET_DEG, 1)
    expect(await text('compression-card')).toMatch(/Seat timing: the 0\.050 in closing \+ 15° \(common practice\)/)
    await at('compression-basis-seat').click()
    await expectFigure('compression-dynamic', dynamicCompressionRatio({ ...engine, ...heads, timingBasis: 'seat' }), 2)
    await expectFigure('compression-seat-closing', 42, 1)
    expect(await text('compression-card')).toMatch(/Seat timing, as the cam card gives it/)
    await at('compression-basis-lift050').click()
    await expectFigure('compression-dynamic', dynamicCompressionRatio({ ...engine, ...heads, timingBasis: 'lift050' }), 2)

    await fill({ 'power-lbFt': '520', 'power-rpm': '5400', 'power-displacementCi': String(ci.toFixed(1)) })
    const hp = hpFromTorque(520, 5400)
    await expectFigure('power-power', hp, 1)
    await expectFigure('power-bmep', bmepPsi(520, Number(ci.toFixed(1))), 1)
    await expectFigure('power-per-ci', hpPerCi(hp, Number(ci.toFixed(1))), 3)

    // Metric: the page rewrites what was typed; the figures must equal the module's for the values now on screen.
    await at('tools-units-metric').click()
    await expect.poll(() => text('displacement-boreIn-unit')).toBe('mm')
    // One unit choice for the whole app: the header's toggle shows it too.
    expect(await at('units-toggle-metric').getAttribute('aria-pressed')).toBe('true')
    expect(await at('displacement-boreIn').inputValue()).toBe((4.125 * 25.4).toFixed(2))
    const metric = {
      boreIn: mmToIn(await value('displacement-boreIn')), strokeIn: mmToIn(await value('displacement-strokeIn')),
      cylinders: await value('displacement-cylinders'), rodLengthIn: mmToIn(await value('displacement-rodLengthIn')),
    }
    const metricCi = displacementCi(metric.boreIn, metric.strokeIn, metric.cylinders)
    await expectFigure('displacement-litres', ciToLitres(metricCi), 3)
    await expectFigure('displacement-ci', metricCi, 1)

    const metricHeads = {
      boreIn: mmToIn(await value('compression-boreIn')), strokeIn: mmToIn(await value('compression-strokeIn')),
      rodLengthIn: mmToIn(await value('compression-rodLengthIn')), chamberCc: await value('compression-chamberCc'),
      pistonCc: await value('compression-pistonCc'), gasketBoreIn: mmToIn(await value('compression-gasketBoreIn')),
      gasketThicknessIn: mmToIn(await value('compression-gasketThicknessIn')), deckClearanceIn: mmToIn(await value('compression-deckClearanceIn')),
      intakeClosesAbdcDeg: await value('compression-intakeClosesAbdcDeg'),
    }
    await expectFigure('compression-static', staticCompressionRatio(metricHeads), 2)
    await expectFigure('compression-dynamic', dynamicCompressionRatio({ ...metricHeads, timingBasis: 'lift050' }), 2)

    // Power and BMEP in metric against the module's own metric functions (N·m, litres).
    expect(await text('power-lbFt-unit')).toBe('N·m')
    const nm = await value('power-lbFt')
    const litres = await value('power-displacementCi')
    const rpm = await value('power-rpm')
    await expectFigure('power-power', kwFromNm(nm, rpm), 1)
    await expectFigure('power-bmep', bmepKpa(nm, litres), 1)
    expect(await at('power-power').getAttribute('data-unit')).toBe('kW')
    expect(await at('power-bmep').getAttribute('data-unit')).toBe('kPa')
  })

  it('cam events, piston speed, airflow and injector size equal the module\'s; common-practice figures are marked; cautions sit beside fuel and rpm', async () => {
    await openTools()
    const cam = { intakeDurationDeg: 236, exhaustDurationDeg: 244, lobeSeparationDeg: 110, intakeCenterlineDeg: 106 }
    await fill({ 'cam-intakeDurationDeg': '236', 'cam-exhaustDurationDeg': '244', 'cam-lobeSeparationDeg': '110', 'cam-intakeCenterlineDeg': '106' })
    const events = camEvents(cam)
    const camFigures: [string, keyof CamEvents][] = [
      ['cam-overlap', 'overlapDeg'], ['cam-intake-opens', 'intakeOpensBtdcDeg'], ['cam-intake-closes', 'intakeClosesAbdcDeg'],
      ['cam-exhaust-opens', 'exhaustOpensBbdcDeg'], ['cam-exhaust-closes', 'exhaustClosesAtdcDeg'], ['cam-exhaust-centerline', 'exhaustCenterlineDeg'], ['cam-advance', 'advanceDeg'],
    ]
    for (const [test, key] of camFigures) await expectFigure(test, events[key], 1)
    expect(await text('cam-card')).toContain('common practice')
    // At 0.050 in the seat closing is estimated 15° later (common practice); on seat timing it is the closing itself.
    await expectFigure('cam-intake-seats', events.intakeClosesAbdcDeg + SEAT_CLOSING_OFFSET_DEG, 1)
    expect(await text('cam-figures')).toContain('At 0.050 in lift')
    await at('cam-basis-seat').click()
    await expectFigure('cam-intake-seats', events.intakeClosesAbdcDeg, 1)
    expect(await text('cam-figures')).toContain('At the seat')

    await fill({ 'piston-strokeIn': '4.000', 'piston-rodLengthIn': '6.125', 'piston-rpm': '7800' })
    await expectFigure('piston-speed', meanPistonSpeedFtMin(4, 7800), 0)
    expect(await text('caution-rpm')).toMatch(/parts makers' ratings/)
    expect(await text('caution-rpm')).toMatch(/class rules/)

    await fill({ 'airflow-displacementCi': '427.6', 'airflow-rpm': '6800', 'airflow-volumetricEfficiency': '95' })
    await expectFigure('airflow-flow', airflowCfm(427.6, 6800, 0.95), 0)

    // E85 with nitrous: the BSFC field starts from the module's default for a power adder, gasoline's scaled by 14.7 / 9.8.
    await at('fuel-fuel').selectOption('e85')
    await at('fuel-adder').selectOption('nitrous')
    await expect.poll(() => at('fuel-bsfc').inputValue()).toBe(fuelDefaults.e85.bsfcBoosted.toFixed(2))
    expect(fuelDefaults.e85.bsfcBoosted.toFixed(2)).toBe('0.90')
    expect(await text('fuel-bsfc-note')).toMatch(/^Default BSFC, E85 with a power adder: gasoline's 0\.60 lb\/\(hp·h\) \(common practice for power mixtures\) × 14\.7 \/ 9\.8/)
    await expectFigure('fuel-bsfc-used', fuelDefaults.e85.bsfcBoosted, 2)
    expect(await text('fuel-figures')).toContain('The default for E85')
    expect(await text('fuel-card')).toContain('Common practice: 80 %')
    await fill({ 'fuel-hp': '750', 'fuel-injectors': '8', 'fuel-maxDutyCycle': '85' })
    const lbHr = injectorSizeLbHr({ hp: 750, bsfc: fuelDefaults.e85.bsfcBoosted, injectors: 8, maxDutyCycle: 0.85 })
    await expectFigure('fuel-injector-lbhr', lbHr, 1)
    await expectFigure('fuel-injector-ccmin', lbHrToCcMin(lbHr, fuelDefaults.e85.densityGPerCc), 0)
    const fuelCaution = await text('caution-fuel')
    expect(fuelCaution).toMatch(/parts makers' flow data/)
    expect(fuelCaution).toMatch(/Alcohol fuels/)
    expect(fuelCaution).toMatch(/Nitrous bottles/)
    expect(fuelCaution).toMatch(/class rules/)
    expect(await text('caution-general')).toMatch(/licensed professionals/)

    // A measured BSFC typed over the common-practice one is the figure used.
    await fill({ 'fuel-bsfc': '0.72' })
    await expectFigure('fuel-injector-lbhr', injectorSizeLbHr({ hp: 750, bsfc: 0.72, injectors: 8, maxDutyCycle: 0.85 }), 1)
    await expectFigure('fuel-bsfc-used', 0.72, 2)
    expect(await text('fuel-figures')).toContain('Your figure, not the default')

    // Methanol naturally aspirated: 0.50 × 14.7 / 6.4 = 1.15 (rounded up), 2.3 × gasoline's.
    await at('fuel-fuel').selectOption('methanol')
    await at('fuel-adder').selectOption('none')
    await expect.poll(() => at('fuel-bsfc').inputValue()).toBe('1.15')
    await expectFigure('fuel-injector-lbhr', injectorSizeLbHr({ hp: 750, bsfc: fuelDefaults.methanol.bsfcNa, injectors: 8, maxDutyCycle: 0.85 }), 1)
  })

  it('weather correction equals the module\'s under two standards and in metric, and says when the weather is outside the standard\'s limits', async () => {
    await openTools()
    // A hot day (118 °F is 47.8 °C), beyond the 318.2 K the published band allows for SAE J1349.
    const weather = { baroInHg: 28.6, airTempF: 118, humidityPct: 60 }
    await fill({ 'correction-baroInHg': '28.60', 'correction-airTempF': '118', 'correction-humidityPct': '60', 'correction-observedHp': '500' })
    const check = (standard: CorrectionStandard, w = weather) => correctionValidity(standard, w)
    await expectFigure('correction-factor', check('SAE_J1349_2004').factor, 4)
    await expectFigure('correction-corrected', 500 * check('SAE_J1349_2004').factor, 1)
    expect(check('SAE_J1349_2004').valid).toBe(false)
    await expect.poll(() => text('correction-validity')).toMatch(/^Outside the limits/)
    expect(check('SAE_J1349_2004').reasons.length).toBeGreaterThan(0)
    for (const reason of check('SAE_J1349_2004').reasons) expect(await text('correction-validity')).toContain(reason)
    // The band's source is on screen (EU Regulation 134/2014, Annex I, Appendix 2.2), never "from memory".
    expect(await text('correction-validity')).toContain(STANDARD_LIMITS.SAE_J1349_2004.source)
    expect(await text('correction-validity')).not.toMatch(/memory/i)

    await at('correction-standard').selectOption('DIN_70020')
    await expectFigure('correction-factor', check('DIN_70020').factor, 4)
    expect(await text('caution-dyno')).toMatch(/dyno cell/)

    await at('tools-units-metric').click()
    await expect.poll(() => text('correction-baroInHg-unit')).toBe('kPa')
    const metric = { baroInHg: kpaToInHg(await value('correction-baroInHg')), airTempF: cToF(await value('correction-airTempF')), humidityPct: await value('correction-humidityPct') }
    await expectFigure('correction-factor', check('DIN_70020', metric).factor, 4)
    expect(await at('correction-corrected').getAttribute('data-unit')).toBe('kW')

    // The choice outlives the page: a reload comes back in metric, with the defaults written in metric.
    await browser.page.reload({ waitUntil: 'networkidle' })
    await hydrated()
    await expect.poll(() => text('correction-baroInHg-unit')).toBe('kPa')
    const defaults = { baroInHg: kpaToInHg(await value('correction-baroInHg')), airTempF: cToF(await value('correction-airTempF')), humidityPct: await value('correction-humidityPct') }
    await expectFigure('correction-factor', check('SAE_J1349_2004', defaults).factor, 4)
  })

  it('a bad input shows a message beside its field and no figure, including the module\'s own refusals', async () => {
    await openTools()
    await fill({ 'displacement-boreIn': '4,030' })
    await expect.poll(() => text('displacement-boreIn-error')).toMatch(/^Bore must be a number/)
    expect(await at('displacement-figures').count()).toBe(0)
    expect(await at('displacement-ci').count()).toBe(0)
    expect(await text('displacement-blocked')).toContain('Fix the marked field')
    await fill({ 'displacement-boreIn': '4.030' })
    await expectFigure('displacement-ci', displacementCi(4.03, 3.48, 8), 1)
    expect(await at('displacement-boreIn-error').count()).toBe(0)

    await fill({ 'displacement-rodLengthIn': '1.5' })
    await expect.poll(() => text('displacement-rodLengthIn-error')).toBe('Rod length must lie between 2 and 12 in')
    expect(await at('displacement-ci').count()).toBe(0)

    // Every field in range, but a 20 cc dome in a 10 cc chamber leaves no room: the module's RangeError, beside the piston field.
    await fill({ 'compression-chamberCc': '10', 'compression-pistonCc': '-20' })
    await expect.poll(() => text('compression-pistonCc-error')).toMatch(/^Piston top volume: these dimensions leave no clearance volume/)
    expect(await at('compression-static').count()).toBe(0)
    expect(await at('compression-dynamic').count()).toBe(0)

    await fill({ 'fuel-injectors': '0' })
    await expect.poll(() => text('fuel-injectors-error')).toBe('Injectors must lie between 1 and 32')
    expect(await at('fuel-injector-lbhr').count()).toBe(0)

    await at('tools-units-metric').click()
    await fill({ 'correction-airTempF': '70' })
    await expect.poll(() => text('correction-airTempF-error')).toBe('Air temperature must lie between -29 and 54 °C')
    expect(await at('correction-factor').count()).toBe(0)

    expect(browser.requests.filter(url => !isLocal(url))).toEqual([])
  })
})
