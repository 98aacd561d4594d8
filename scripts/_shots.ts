import { openBrowser } from '../tests/support/browser'
const base = process.env.BASE ?? 'http://127.0.0.1:3100'
const who = process.argv[2] ?? ''
const paths = process.argv.slice(3)
const { page, close } = await openBrowser()
if (who) {
  await page.goto(`${base}/sign-in`, { waitUntil: 'networkidle' })
  await page.fill('#field-email', who)
  await page.fill('#field-password', 'torque-demo-2026')
  await page.click('[data-test="password-form"] button[type="submit"]')
  await page.waitForTimeout(2500)
}
for (const p of paths) {
  await page.goto(`${base}${p}`, { waitUntil: 'networkidle' })
  await page.waitForTimeout(1200)
  const name = `${who.split('@')[0] || 'anon'}${p.replace(/[/?=&]+/g, '_')}`.slice(0, 80)
  await page.screenshot({ path: `/tmp/shots/${name}.png`, fullPage: true })
  console.log(name, page.url())
}
await close()
