import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { chromium, type BrowserContext, type Page } from 'playwright-core'

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
