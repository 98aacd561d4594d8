import { existsSync, readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { firstLoadAssets } from '../../bench/pages'
import { api } from '../support/context'

// Reads the built client (.output/public) the app tier serves: what a first visit to a page loads
// is the HTML's script, modulepreload and stylesheet tags (bench/pages.ts reads them the same way).
const publicDir = resolve(import.meta.dirname, '..', '..', '.output', 'public')
const file = (url: string) => readFileSync(resolve(publicDir, `.${new URL(url, 'http://x').pathname}`), 'utf8')

/** A string Chart.js's own source holds and minifying keeps (its error for a canvas it cannot draw on). */
const CHART_JS_MARKER = 'can\'t acquire context from the given item'

async function firstLoad(path: string) {
  const res = await api(path, { headers: { 'accept-encoding': 'identity' } })
  expect(res.status).toBe(200)
  const html = res.body as string
  const entry = /<script[^>]+type="module"[^>]+src="([^"]+)"|<script[^>]+src="([^"]+)"[^>]+type="module"/.exec(html)
  return { html, entry: (entry?.[1] ?? entry?.[2])!, ...firstLoadAssets(html) }
}

describe('the built client', () => {
  it('keeps Chart.js out of the entry chunk and out of the first load of home, search and a build page', async () => {
    const { body: list } = await api('/api/builds?perPage=1')
    const pages = ['/', '/search', `/builds/${list.items[0].slug}`]
    for (const path of pages) {
      const page = await firstLoad(path)
      expect(page.entry).toMatch(/^\/_nuxt\/.+\.js$/)
      expect(existsSync(resolve(publicDir, `.${page.entry}`))).toBe(true)
      expect(page.scripts.length).toBeGreaterThan(0)
      for (const script of page.scripts) expect(file(script), `${path}: ${script}`).not.toContain(CHART_JS_MARKER)
    }
    // The marker does find Chart.js where it is: some chunk of the build holds it.
    const { readdirSync } = await import('node:fs')
    const chunks = readdirSync(resolve(publicDir, '_nuxt')).filter(f => f.endsWith('.js'))
    expect(chunks.some(f => readFileSync(resolve(publicDir, '_nuxt', f), 'utf8').includes(CHART_JS_MARKER))).toBe(true)
  })

  it('leaves the code of lazily hydrated parts out of the first load, while their server HTML is on the page', async () => {
    const { readdirSync } = await import('node:fs')
    const chunks = readdirSync(resolve(publicDir, '_nuxt')).filter(f => f.endsWith('.js'))
    const { body: list } = await api('/api/builds?perPage=1')
    // A literal each part's own template holds: the build's spec sheet, and one calculator (each hydrates when the page is idle).
    const parts = [
      { path: `/builds/${list.items[0].slug}`, marker: 'Camshaft and induction' },
      { path: '/tools', marker: 'Static flow each injector needs to feed a target power' },
    ]
    for (const { path, marker } of parts) {
      const page = await firstLoad(path)
      expect(page.html, path).toContain(marker)
      expect(page.scripts.length).toBeGreaterThan(0)
      for (const script of page.scripts) expect(file(script), `${path}: ${script}`).not.toContain(marker)
      // The marker does find the part's code: some chunk of the build holds it.
      expect(chunks.some(f => readFileSync(resolve(publicDir, '_nuxt', f), 'utf8').includes(marker)), marker).toBe(true)
    }
  })

  it('loads Manrope\'s latin subset alone and preloads the body weight', async () => {
    const page = await firstLoad('/')
    expect(page.html).toMatch(/<link[^>]+rel="preload"[^>]+as="font"[^>]+manrope-latin-400-normal[^>]+\.woff2/)
    const css = page.styles.map(file).join('\n')
    expect(css).toContain('font-display:swap')
    expect(css).toContain('manrope-latin-400-normal')
    expect(css).not.toMatch(/manrope-(cyrillic|greek|vietnamese|latin-ext)/)
    expect(css).not.toContain('manrope-latin-500-normal')
  })
})
