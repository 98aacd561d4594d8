/**
 * `npm run bench:lighthouse`: Lighthouse (the pinned devDependency, its default mobile preset:
 * emulated phone, slow 4G and 4× CPU slowdown) with Debian's Chromium, headless, on home, a build
 * page, search and tools of the built app over a demo-seeded MariaDB. Prints the performance,
 * accessibility and best-practices scores and LCP, CLS and TBT. CHROME_PATH overrides /usr/bin/chromium.
 * Loopback only, ports as in bench/pages.ts. `npm run bench:lighthouse -- tools search` runs those pages alone.
 */
import { writeFileSync } from 'node:fs'
import { loadavg } from 'node:os'
import { resolve } from 'node:path'
import * as chromeLauncher from 'chrome-launcher'
import lighthouse from 'lighthouse'
import { startPageStack } from './pages'

const chromePath = process.env.CHROME_PATH || '/usr/bin/chromium'
const stack = await startPageStack({ bare: false })
const rows: string[] = []
try {
  const only = process.argv.slice(2)
  for (const page of stack.pages.filter(p => p.name !== 'sign-in' && (!only.length || only.some(o => p.name.startsWith(o))))) {
    // A fresh browser for each page, so no page's cache or trace leaks into the next.
    const chrome = await chromeLauncher.launch({ chromePath, chromeFlags: ['--headless=new', '--no-sandbox', '--disable-gpu', '--disable-dev-shm-usage'] })
    const result = await lighthouse(stack.app + page.path, { port: chrome.port, output: 'json', logLevel: 'error', onlyCategories: ['performance', 'accessibility', 'best-practices'] })
      .finally(() => chrome.kill())
    if (!result) throw new Error(`Lighthouse gave no result for ${page.path}`)
    // TW_LIGHTHOUSE_REPORTS=<folder> keeps each page's full report (JSON) for a closer look.
    if (process.env.TW_LIGHTHOUSE_REPORTS) writeFileSync(resolve(process.env.TW_LIGHTHOUSE_REPORTS, `${page.name.replace(/\W+/g, '-')}.json`), JSON.stringify(result.lhr))
    const { categories, audits, runtimeError } = result.lhr
    if (runtimeError) rows.push(`  ${page.name.padEnd(11)} Lighthouse could not measure it: ${runtimeError.code} ${runtimeError.message}`)
    const score = (k: string) => String(Math.round((categories[k]?.score ?? 0) * 100)).padStart(3)
    const ms = (k: string) => `${Math.round(audits[k]?.numericValue ?? 0)} ms`
    rows.push(`  ${page.name.padEnd(11)} ${score('performance')}  ${score('accessibility')}  ${score('best-practices')}   LCP ${ms('largest-contentful-paint').padStart(8)} · CLS ${(audits['cumulative-layout-shift']?.numericValue ?? 0).toFixed(3)} · TBT ${ms('total-blocking-time')}`)
    const failed = Object.values(audits).filter(a => a.score !== null && a.score < 1 && categories.accessibility?.auditRefs.some(r => r.id === a.id && r.weight > 0))
    if (failed.length) rows.push(`              accessibility audits not passed: ${failed.map(a => a.id).join(', ')}`)
    // Which elements moved, when the page shifts more than the 0.05 the pages aim for.
    const shifts = (audits['layout-shifts']?.details as { items?: { score?: number, node?: { selector?: string, nodeLabel?: string } }[] } | undefined)?.items ?? []
    if ((audits['cumulative-layout-shift']?.numericValue ?? 0) > 0.05) {
      if (!shifts.length) rows.push(`              shifts: ${JSON.stringify(audits['layout-shifts']?.details ?? audits['layout-shifts']?.errorMessage ?? 'no detail').slice(0, 300)}`)
      for (const item of shifts.slice(0, 3)) rows.push(`              shift ${(item.score ?? 0).toFixed(3)}: ${item.node?.selector ?? '?'} (${(item.node?.nodeLabel ?? '').slice(0, 60)})`)
    }
  }
}
finally {
  await stack.close()
}
console.log(`\nLighthouse ${(await import('lighthouse/package.json', { with: { type: 'json' } })).default.version}, mobile preset, ${chromePath} (${new Date().toISOString()}, load average ${loadavg()[0]!.toFixed(1)} on 2 cores)`)
console.log(`  ${'page'.padEnd(11)} perf  a11y  best`)
for (const r of rows) console.log(r)
