// In Chromium: the shop's composer offers another combination at a phone's width (390 px) with its
// displacement computed as the shop types and checked against the request's cap, and the racer
// accepts a change order only after a confirm step that names the amounts.
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { sendChangeOrder } from '../../server/services/change-orders'
import { createRequest } from '../../server/services/deals'
import { approveMilestone, disputeMilestone, settleDispute, submitMilestone } from '../../server/services/milestones'
import { displacementCi } from '../../shared/engine/geometry'
import { PERSONAS } from '../support/auth'
import { openBrowser, signInPage } from '../support/browser'
import { baseUrl } from '../support/context'
import { PEOPLE, actorByEmail, dealTestContext, fundMilestone, makeOrder, requestInput, schema } from '../support/deals'

let shop: Awaited<ReturnType<typeof openBrowser>>
let racer: Awaited<ReturnType<typeof openBrowser>>
let deal: Awaited<ReturnType<typeof dealTestContext>>
beforeAll(async () => {
  shop = await openBrowser()
  racer = await openBrowser()
  deal = await dealTestContext()
})
afterAll(async () => {
  await shop?.close()
  await racer?.close()
  await deal?.close()
})

const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)

describe('the composer\'s alternative combination at 390 px', () => {
  it('computes the displacement as the shop types, says it is inside the cap, and shows it on the sent quote', async () => {
    const ctx = deal.ctx
    const racerActor = await actorByEmail(ctx.db, PEOPLE.racer)
    const { id } = await createRequest(ctx, racerActor, requestInput({ title: `Alternative in Chromium ${Math.random().toString(36).slice(2, 8)}`, displacementCapCi: 440 }))
    const { page } = shop
    await page.setViewportSize({ width: 390, height: 844 })
    await signInPage(page, PERSONAS.shop)
    await page.goto(`${baseUrl()}/deals/requests/${id}/quote`, { waitUntil: 'networkidle' })
    const line = page.locator('[data-test="line-item"]').first()
    await line.getByLabel('Description').fill('Bore, hone and deck the block')
    await line.getByLabel('Unit price').fill('10,000')
    await page.click('[data-test="apply-split"]')

    await page.click('[data-test="alternative-toggle"]')
    const fields = page.locator('[data-test="alternative-fields"]')
    await fields.locator('input[name="alternative-boreIn"]').fill('4.155')
    await fields.locator('input[name="alternative-strokeIn"]').fill('4')
    await fields.locator('input[name="alternative-cylinders"]').fill('8')
    await fields.locator('input[name="alternative-camIntakeDurationDeg"]').fill('248')
    await fields.locator('input[name="alternative-camExhaustDurationDeg"]').fill('256')
    await fields.locator('input[name="alternative-camLobeSeparationDeg"]').fill('110')
    await fields.locator('input[name="alternative-cylinderHeads"]').fill('CNC-ported aluminium, 225 cc runners')
    await fields.locator('input[name="alternative-camshaft"]').fill('Solid roller')
    const expected = displacementCi(4.155, 4, 8).toFixed(1)
    const preview = await fields.locator('[data-test="alternative-displacement"]').innerText()
    expect(preview).toContain(expected)
    expect(preview).toContain('Inside the request\'s cap')
    // Nothing in the form runs off a phone's screen.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390)
    // A bore past the cap's reach turns the line around.
    await fields.locator('input[name="alternative-boreIn"]').fill('4.3')
    expect(await fields.locator('[data-test="alternative-cap"]').innerText()).toContain('Over')
    await fields.locator('input[name="alternative-boreIn"]').fill('4.155')

    await page.click('[data-test="send-quote"]')
    await page.waitForURL(`${baseUrl()}/deals/requests/${id}`)
    const shown = page.locator('[data-test="quote-panel"] [data-test="quote-alternative"]')
    expect(await shown.locator('[data-test="alternative-displacement"]').innerText()).toContain(expected)
    expect(await shown.innerText()).toContain('Solid roller')
    const [quote] = await deal.db.select().from(schema.quotes).where(eq(schema.quotes.requestId, id))
    const [rev] = await deal.db.select().from(schema.quoteRevisions).where(eq(schema.quoteRevisions.quoteId, quote!.id))
    expect(rev!.alternative).toMatchObject({ boreIn: 4.155, strokeIn: 4, cylinders: 8, camLobeSeparationDeg: 110 })
  })
})

/** An order whose first milestone was released and whose second was refunded; the third awaits payment. */
async function orderWithRefund() {
  const ctx = deal.ctx
  const order = await makeOrder(ctx)
  const [m1, m2, m3] = order.milestones as [typeof order.milestones[0], typeof order.milestones[0], typeof order.milestones[0]]
  await fundMilestone(ctx, order.racer, m1.id)
  await submitMilestone(ctx, order.shop, m1.id, { notes: 'Parts ordered.', proofFileIds: [], deliveryPullId: null })
  await approveMilestone(ctx, order.racer, m1.id)
  await fundMilestone(ctx, order.racer, m2.id)
  await disputeMilestone(ctx, order.racer, m2.id, 'The block came back cracked.')
  await settleDispute(ctx, await actorByEmail(ctx.db, PEOPLE.admin), m2.id, 'refund', 'Refunded: the block was not usable.')
  return { order, m3 }
}

describe('the shop sending a change order', () => {
  it('starts from the unpaid milestone and sends the new plan once it adds up', async () => {
    const { order } = await orderWithRefund()
    const { page } = shop
    await page.setViewportSize({ width: 390, height: 844 })
    await page.goto(`${baseUrl()}/deals/orders/${order.orderId}`, { waitUntil: 'networkidle' })
    if (await page.locator('[data-test="nav-account"]').count() === 0) await signInPage(page, PERSONAS.shop)
    await page.goto(`${baseUrl()}/deals/orders/${order.orderId}`, { waitUntil: 'networkidle' })
    await page.click('[data-test="new-change-order"]')
    const form = page.locator('[data-test="change-order-form"]')
    // quoteInput's third milestone, $7,380.00, is the one still unpaid (tests/support/deals.ts).
    expect(await form.locator('input[name="changeTotal"]').inputValue()).toBe('7380.00')
    await form.locator('input[name="changeTotal"]').fill('9,000')
    await form.locator('[data-test="send-change-order"]').click()
    // The milestones ($7,380.00) do not add up to $9,000.00 yet: nothing is sent.
    await form.getByRole('alert').first().waitFor()
    expect(await deal.db.select().from(schema.changeOrders).where(eq(schema.changeOrders.orderId, order.orderId))).toHaveLength(0)
    await form.locator('[data-test="milestone-row"]').first().getByLabel('Amount').fill('9000')
    await form.locator('[data-test="send-change-order"]').click()
    await expect.poll(async () => (await deal.db.select().from(schema.changeOrders).where(eq(schema.changeOrders.orderId, order.orderId))).map(c => c.totalCents), { timeout: 15_000 }).toEqual([900_000])
    await page.locator('[data-test="change-order-milestones"]').waitFor()
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390)
  })
})

describe('the racer accepting a change order', () => {
  it('asks first with the amounts, changes nothing on "Not yet", and replaces the unpaid milestone on the yes', async () => {
    const ctx = deal.ctx
    const { order, m3 } = await orderWithRefund()
    const { id: changeId } = await sendChangeOrder(ctx, order.shop, order.orderId, {
      totalCents: 900_000,
      milestones: [
        { title: 'Short block, second run', deliverable: 'Machined short block', amountCents: 500_000, dueDate: inDays(45) },
        { title: 'Dyno delivery', deliverable: 'Engine with its pull', amountCents: 400_000, dueDate: inDays(90) },
      ],
      lineItems: [],
      notes: '',
    })
    const states = async () => (await deal.db.select().from(schema.milestones).where(eq(schema.milestones.orderId, order.orderId)).orderBy(schema.milestones.position)).map(m => m.state)
    const { page } = racer
    await signInPage(page, PERSONAS.racer)
    await page.goto(`${baseUrl()}/deals/orders/${order.orderId}`, { waitUntil: 'networkidle' })
    const box = page.locator('[data-test="change-order"]')
    expect(await box.locator('[data-test="change-order-milestones"] li').count()).toBe(2)
    await box.locator('[data-test="accept-change-order"]').click()
    const detail = await box.locator('[data-test="confirm-detail"]').innerText()
    // The new plan ($9,000.00) and the unpaid milestone it replaces (quoteInput's third, $7,380.00).
    expect(detail).toContain('$9,000.00')
    expect(detail).toContain(`$${(m3.amountCents / 100).toLocaleString('en-US', { minimumFractionDigits: 2 })}`)
    expect(await page.evaluate(() => document.activeElement?.getAttribute('data-test'))).toBe('confirm')
    await box.locator('[data-test="confirm-no"]').click()
    expect(await box.locator('[data-test="confirm"]').count()).toBe(0)
    expect(await states()).toEqual(['released', 'refunded', 'awaiting_payment'])

    await box.locator('[data-test="accept-change-order"]').click()
    await box.locator('[data-test="confirm-yes"]').click()
    await expect.poll(async () => (await deal.db.select().from(schema.changeOrders).where(eq(schema.changeOrders.id, changeId)))[0]!.status, { timeout: 15_000 }).toBe('accepted')
    expect(await states()).toEqual(['released', 'refunded', 'cancelled', 'awaiting_payment', 'awaiting_payment'])
    await page.locator('[data-test="milestone"]').nth(4).waitFor()
  })
})
