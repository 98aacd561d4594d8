import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { chromium, type BrowserContext, type Page } from 'playwright-core'
import { DEMO_PASSWORD } from './auth'
import { baseUrl } from './context'

const ARGS = ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage']

/** Debian's Chromium, headless, in a throw-away profile; records every URL the pages request. */
export async function openBrowser(): Promise<{ context: BrowserContext, page: Page, requests: string[], close: () => Promise<void> }> {
  const profile = mkdtempSync(join(tmpdir(), 'tw-chromium-'))
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: ARGS,
    viewport: { width: 1280, height: 900 },
  })
  const requests: string[] = []
  context.on('request', req => requests.push(req.url()))
  const page = context.pages()[0] ?? await context.newPage()
  return {
    context,
    page,
    requests,
    close: async () => {
      await context.close()
      rmSync(profile, { recursive: true, force: true })
    },
  }
}

/** True for addresses on this machine: the only places a page may reach. */
export function isLocal(url: string): boolean {
  if (url.startsWith('data:') || url.startsWith('blob:') || url.startsWith('about:')) return true
  const host = new URL(url).hostname
  return host === '127.0.0.1' || host === 'localhost' || host === '[::1]'
}

/**
 * Signs in through the sign-in page's password form, as a person does, and waits for the signed-in
 * header. On a phone the account link sits in the closed header menu, so it waits for it to exist.
 */
export async function signInPage(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' })
  await page.fill('#field-email', email)
  await page.fill('#field-password', password)
  await page.click('[data-test="password-form"] button[type="submit"]')
  await page.locator('[data-test="nav-account"]').waitFor({ state: 'attached' })
}
