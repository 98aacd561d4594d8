// A whole deal in Chromium with two people at once: a racer requests a quote from a build page, the
// shop quotes it in three milestones, the racer accepts and pays the first deposit on the payments
// fake's own page, and both see it funded; then a message from one appears on the other's open page.
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { PERSONAS, SHOP } from '../support/auth'
import { isLocal, openBrowser, signInPage } from '../support/browser'
import { baseUrl, schema, testDb } from '../support/context'

type Browser = Awaited<ReturnType<typeof openBrowser>>
let racer: Browser
let shop: Browser
beforeAll(async () => {
  racer = await openBrowser()
  shop = await openBrowser()
})
afterAll(async () => {
  await racer?.close()
  await shop?.close()
})

const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)

describe('a deal in Chromium', () => {
  it('goes from a request to a funded first deposit, seen by both sides, and carries messages live', async () => {
    const { db, close } = await testDb()
    const [build] = await db.select({ slug: schema.builds.slug }).from(schema.builds)
      .innerJoin(schema.shops, eq(schema.shops.id, schema.builds.shopId))
      .where(eq(schema.shops.slug, SHOP)).limit(1)
    await close()
    const r = racer.page
    const s = shop.page
    await signInPage(r, PERSONAS.racer)
    await signInPage(s, PERSONAS.shop)

    // The racer asks for a quote from one of the shop's builds.
    await r.goto(`${baseUrl()}/builds/${build!.slug}`, { waitUntil: 'networkidle' })
    await r.click('[data-test="request-quote"]')
    await r.locator('[data-test="request-form"]').waitFor()
    const title = `Browser deal ${Date.now().toString(36)}`
    await r.fill('input[name="title"]', title)
    await r.fill('input[name="targetHp"]', '620')
    await r.fill('input[name="targetTq"]', '540')
    await r.fill('input[name="displacementCapCi"]', '400')
    await r.selectOption('select[name="fuel"]', 'race_gas')
    await r.selectOption('select[name="transmission"]', 'automatic')
    await r.fill('input[name="stallRpm"]', '4600')
    await r.fill('input[name="shiftRpm"]', '7000')
    await r.fill('input[name="budgetMin"]', '18,000')
    await r.fill('input[name="budgetMax"]', '26,000')
    await r.fill('input[name="deadline"]', inDays(150))
    await r.click('[data-test="request-submit"]')
    await r.waitForURL(/\/deals\/requests\/\d+$/)
    const requestUrl = r.url()
    expect(await r.locator('[data-test="request-title"]').innerText()).toBe(title)

    // The shop writes the quote: three lines, three milestones split 30 / 40 / 30 %.
    await s.goto(requestUrl, { waitUntil: 'networkidle' })
    await s.click('[data-test="write-quote"]')
    await s.locator('[data-test="quote-editor"]').waitFor()
    await s.click('[data-test="add-line"]')
    await s.click('[data-test="add-line"]')
    const lines = [['Machine work', 'Bore, hone and deck', '1', '4,800'], ['Rotating assembly', 'Forged crank, rods, pistons', '1', '9,200'], ['Assembly and dyno', 'Assembly and dyno tuning', '1', '4,000.01']]
    for (const [i, [category, description, qty, price]] of lines.entries()) {
      const row = s.locator('[data-test="line-item"]').nth(i)
      await row.getByLabel('Category').fill(category!)
      await row.getByLabel('Description').fill(description!)
      await row.getByLabel('Quantity').fill(qty!)
      await row.getByLabel('Unit price').fill(price!)
    }
    expect(await s.locator('[data-test="editor-total"]').innerText()).toBe('$18,000.01')
    await s.click('[data-test="add-milestone"]')
    const plan = [['Deposit', 'Parts ordered', '30', 14], ['Short block', 'Assembled short block', '40', 60], ['Dyno delivery', 'Engine with its pull', '30', 110]] as const
    for (const [i, [t, d, pct, days]] of plan.entries()) {
      const row = s.locator('[data-test="milestone-row"]').nth(i)
      await row.getByLabel('Milestone title').fill(t)
      await row.getByLabel('Deliverable').fill(d)
      await row.getByLabel('Percent of the total').fill(pct)
      await row.getByLabel('Due date').fill(inDays(days))
    }
    await s.click('[data-test="apply-split"]')
    // $18,000.01 × 30 / 40 / 30 %: the odd cent goes to the largest remainder (the 40 % share).
    expect(await s.locator('[data-test="milestone-row"]').nth(0).getByLabel('Amount').inputValue()).toBe('5400.00')
    expect(await s.locator('[data-test="milestone-row"]').nth(1).getByLabel('Amount').inputValue()).toBe('7200.01')
    await s.click('[data-test="send-quote"]')
    await s.waitForURL(requestUrl)
    await s.locator('[data-test="quote-panel"]').waitFor()

    // The racer sees it, accepts, and pays the first deposit on the fake's page.
    await r.reload({ waitUntil: 'networkidle' })
    expect(await r.locator('[data-test="quote-total"]').innerText()).toBe('$18,000.01')
    expect(await r.locator('[data-test="quote-milestone"]').count()).toBe(3)
    await r.click('[data-test="accept-quote"]')
    // Accepting asks first, with the total and the first deposit that comes next.
    const acceptDetail = await r.locator('[data-test="confirm-detail"]').innerText()
    expect(acceptDetail).toContain('$18,000.01')
    expect(acceptDetail).toContain('$5,400.00')
    await r.click('[data-test="confirm-yes"]')
    await r.waitForURL(/\/deals\/orders\/\d+$/)
    const orderUrl = r.url()
    await r.click('[data-test="pay-milestone"]')
    await r.waitForURL(/\/pay\/cs_test_/)
    expect(await r.locator('[data-test="fake-total"]').innerText()).toBe('$5,400.00')
    await r.fill('input[name="name"]', 'Jonah Pelletier')
    await r.fill('input[name="cardNumber"]', '4242 4242 4242 4242')
    await r.fill('input[name="expiry"]', '12/39')
    await r.fill('input[name="cvc"]', '123')
    await r.click('[data-test="fake-pay"]')
    await r.waitForURL(/\/deals\/orders\/\d+\/paid\?milestone=\d+&session=cs_test_/)
    await r.locator('[data-test="payment-return"][data-confirmed="true"]').waitFor({ timeout: 20_000 })
    await r.click('[data-test="back-to-order"]')
    await r.locator('[data-test="milestone"]').first().waitFor()
    expect(await r.locator('[data-test="milestone"]').first().getAttribute('data-state')).toBe('funded')

    await s.goto(orderUrl, { waitUntil: 'networkidle' })
    expect(await s.locator('[data-test="milestone"]').first().getAttribute('data-state')).toBe('funded')
    expect(await s.locator('[data-test="payment-row"]').first().innerText()).toMatch(/cs_test_\w+/)

    // Both on the thread: what the shop sends shows on the racer's open page without a reload.
    await r.goto(requestUrl, { waitUntil: 'networkidle' })
    await s.goto(requestUrl, { waitUntil: 'networkidle' })
    const text = `Block is on the stand, ${Date.now()}`
    await s.fill('[data-test="message-input"]', text)
    await s.click('[data-test="message-send"]')
    await s.locator('[data-test="message-body"]', { hasText: text }).waitFor()
    // The product's promise: within 5 seconds on the other side's open page (the page polls every 2 s).
    await r.locator('[data-test="message-body"]', { hasText: text }).waitFor({ timeout: 5000 })
    const reply = `Great, thanks ${Date.now()}`
    await r.fill('[data-test="message-input"]', reply)
    await r.click('[data-test="message-send"]')
    await s.locator('[data-test="message-body"]', { hasText: reply }).waitFor({ timeout: 5000 })

    expect([...racer.requests, ...shop.requests].filter(url => !isLocal(url))).toEqual([])
  })
})
