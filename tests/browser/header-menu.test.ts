// The header's menu on a phone: besides Escape (tests/browser/mobile-pages.test.ts), an open menu
// closes on a tap outside it without taking the focus from what was tapped, when the keyboard leaves it
// by Tab, and when the page changes. The disclosure pattern: WAI-ARIA Authoring Practices 1.2, "Disclosure
// (Show/Hide)"; closing on an outside tap and on focus leaving is common practice for a navigation menu.
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openBrowser } from '../support/browser'
import { baseUrl } from '../support/context'

/** An iPhone 12–15's viewport in CSS px (the product's phone width). */
const PHONE = { width: 390, height: 844 }

let browser: Awaited<ReturnType<typeof openBrowser>>
let page: Page
const menu = () => page.locator('[data-test="nav-menu"]')
const nav = () => page.locator('[data-test="main-nav"]')
const activeTest = () => page.evaluate(() => document.activeElement?.getAttribute('data-test') ?? document.activeElement?.tagName.toLowerCase())

async function openMenu(path: string) {
  await page.goto(`${baseUrl()}${path}`, { waitUntil: 'networkidle' })
  await menu().click()
  expect(await menu().getAttribute('aria-expanded')).toBe('true')
  expect(await nav().isVisible()).toBe(true)
}

beforeAll(async () => {
  browser = await openBrowser()
  page = browser.page
  await page.setViewportSize(PHONE)
})
afterAll(async () => {
  await browser?.close()
})

describe('the header menu on a 390 px phone', () => {
  it('closes on a tap outside it, and the tapped field keeps the focus', async () => {
    await openMenu('/tools')
    // The first text field below the open panel, scrolled into view: a tap there lands on the page, not on the menu.
    const target = await page.evaluate(() => {
      const panelBottom = document.querySelector('[data-test="main-nav"]')!.getBoundingClientRect().bottom + window.scrollY
      const field = [...document.querySelectorAll<HTMLInputElement>('main input[type="number"], main input[type="text"], main input:not([type])')]
        .find(el => el.checkVisibility() && el.getBoundingClientRect().top + window.scrollY > panelBottom + 4)
      if (!field) return null
      field.scrollIntoView({ block: 'center' })
      field.dataset.tapTarget = 'yes'
      const r = field.getBoundingClientRect()
      return { x: r.x + r.width / 2, y: r.y + r.height / 2 }
    })
    expect(target).not.toBeNull()
    await page.mouse.click(target!.x, target!.y)
    expect(await menu().getAttribute('aria-expanded')).toBe('false')
    expect(await nav().isVisible()).toBe(false)
    expect(await page.evaluate(() => (document.activeElement as HTMLElement | null)?.dataset.tapTarget)).toBe('yes')
  })

  it('closes on a tap on a blank part of the page, and does not move the focus to its button', async () => {
    await openMenu('/tools')
    await page.mouse.click(PHONE.width / 2, PHONE.height - 4)
    expect(await menu().getAttribute('aria-expanded')).toBe('false')
    expect(await activeTest()).not.toBe('nav-menu')
  })

  it('stays open for a tap inside it', async () => {
    await openMenu('/tools')
    const box = (await nav().boundingBox())!
    // The panel's own padding below its last control.
    await page.mouse.click(box.x + box.width - 6, box.y + box.height - 4)
    expect(await menu().getAttribute('aria-expanded')).toBe('true')
  })

  it('closes when Tab leaves its last control, and stays open while Tab walks through it', async () => {
    await openMenu('/tools')
    await page.keyboard.press('Tab')
    expect(await page.evaluate(() => document.activeElement?.closest('[data-test="main-nav"]') !== null)).toBe(true)
    expect(await menu().getAttribute('aria-expanded')).toBe('true')
    const last = nav().locator('a, button').last()
    await last.focus()
    expect(await menu().getAttribute('aria-expanded')).toBe('true')
    await page.keyboard.press('Tab')
    expect(await page.evaluate(() => document.activeElement?.closest('[data-test="main-nav"]') === null)).toBe(true)
    expect(await menu().getAttribute('aria-expanded')).toBe('false')
    expect(await nav().isVisible()).toBe(false)
  })

  it('closes when Shift+Tab leaves it through its button', async () => {
    await openMenu('/tools')
    await menu().focus()
    await page.keyboard.press('Shift+Tab')
    expect(await menu().getAttribute('aria-expanded')).toBe('false')
  })

  it('closes when the page changes, by one of its links and by the browser\'s Back', async () => {
    await openMenu('/tools')
    await page.click('[data-test="nav-search"]')
    await page.waitForURL(/\/search$/)
    await expect.poll(() => nav().isVisible()).toBe(false)
    await menu().click()
    expect(await nav().isVisible()).toBe(true)
    await page.goBack()
    await page.waitForURL(/\/tools$/)
    await expect.poll(() => menu().getAttribute('aria-expanded')).toBe('false')
    expect(await nav().isVisible()).toBe(false)
  })
})
