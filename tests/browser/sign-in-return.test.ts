// A deal link opened while signed out comes back to the deal after signing in, by password and by e-mailed link.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { DEMO_PASSWORD, PERSONAS, waitForMail } from '../support/auth'
import { openBrowser } from '../support/browser'
import { baseUrl } from '../support/context'
import { dealTestContext, makeOrder } from '../support/deals'

let deal: Awaited<ReturnType<typeof dealTestContext>>
let orderPath: string
beforeAll(async () => {
  deal = await dealTestContext()
  const { orderId } = await makeOrder(deal.ctx)
  orderPath = `/deals/orders/${orderId}`
})
afterAll(async () => {
  await deal?.close()
})

describe('signing in from a deal link', () => {
  it('returns to the deal after a password sign-in', async () => {
    const browser = await openBrowser()
    try {
      const { page } = browser
      await page.goto(`${baseUrl()}${orderPath}`, { waitUntil: 'networkidle' })
      await page.click('[data-test="deal-sign-in"]')
      await page.waitForURL(/\/sign-in\?next=/)
      await page.fill('#field-email', PERSONAS.racer)
      await page.fill('#field-password', DEMO_PASSWORD)
      await page.click('[data-test="password-form"] button[type="submit"]')
      await page.waitForURL(`${baseUrl()}${orderPath}`)
      await page.locator('[data-test="milestone"]').first().waitFor()
      expect(new URL(page.url()).pathname).toBe(orderPath)
      expect(await page.locator('[data-test="milestone"]').count()).toBeGreaterThan(0)
    }
    finally {
      await browser.close()
    }
  })

  it('returns to the deal after signing in with an e-mailed link', async () => {
    const browser = await openBrowser()
    try {
      const { page } = browser
      await page.goto(`${baseUrl()}/sign-in?next=${encodeURIComponent(orderPath)}`, { waitUntil: 'networkidle' })
      await page.fill('#field-link-email', PERSONAS.racer)
      await page.click('[data-test="link-form"] button[type="submit"]')
      await page.waitForURL(/\/check-inbox/)
      const mail = await waitForMail(PERSONAS.racer, m => m.text.includes(`next=${encodeURIComponent(orderPath)}`))
      const link = /(http\S+\/sign-in\/link\?token=[A-Za-z0-9_-]+&next=\S+)/.exec(mail.text)![1]!
      await page.goto(link, { waitUntil: 'networkidle' })
      await page.click('[data-test="use-link"]')
      await page.waitForURL(`${baseUrl()}${orderPath}`)
      expect(new URL(page.url()).pathname).toBe(orderPath)
    }
    finally {
      await browser.close()
    }
  })
})
