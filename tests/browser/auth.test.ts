import { eq } from 'drizzle-orm'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import type { CookieJar } from '../support/auth'
import { DEMO_PASSWORD, json, makeAccount, PERSONAS, signIn, uniqueEmail, waitForMail } from '../support/auth'
import { openBrowser } from '../support/browser'
import { api, baseUrl, schema, testDb } from '../support/context'

let browser: Awaited<ReturnType<typeof openBrowser>>
let page: Page
beforeAll(async () => {
  browser = await openBrowser()
  page = browser.page
})
afterAll(async () => {
  await browser?.close()
})
beforeEach(async () => {
  await browser.context.clearCookies()
  await page.goto(`${baseUrl()}/`)
  await page.evaluate(() => localStorage.clear())
})

const nav = () => page.locator('[data-test="main-nav"]')

async function signInWithForm(email: string, password: string) {
  await page.goto(`${baseUrl()}/sign-in`, { waitUntil: 'networkidle' })
  await page.fill('#field-email', email)
  await page.fill('#field-password', password)
  await page.click('[data-test="password-form"] button[type="submit"]')
}

async function signOut() {
  await page.click('[data-test="sign-out"]')
  await page.waitForURL(/\/sign-in\?signedOut=1$/)
}

describe('signing up and in, in Chromium', () => {
  it('a racer signs up, confirms from the mail catcher, signs in and sees the racer\'s navigation', async () => {
    const email = uniqueEmail('browser-racer')
    await page.goto(`${baseUrl()}/sign-up`, { waitUntil: 'networkidle' })
    await page.fill('#field-name', 'Juno Carraway')
    await page.fill('#field-email', email)
    await page.fill('#field-password', 'a long enough password')
    await page.click('[data-test="sign-up-form"] button[type="submit"]')
    await page.waitForURL(/\/check-inbox\?/)
    expect(await page.locator('main').innerText()).toContain(email)

    const mail = await waitForMail(email, m => m.subject.includes('Confirm your e-mail'))
    const link = /(http\S+\/sign-in\/link\?token=[A-Za-z0-9_-]+)/.exec(mail.text)![1]!
    await page.goto(link, { waitUntil: 'networkidle' })
    await page.click('[data-test="use-link"]')
    await page.waitForURL(`${baseUrl()}/`)
    await expect.poll(() => nav().getAttribute('data-role')).toBe('racer')
    expect(await page.locator('[data-test="nav-account"]').innerText()).toBe('Juno Carraway')
    expect(await page.locator('[data-test="nav-dashboard"]').count()).toBe(0)
    expect(await page.locator('[data-test="nav-admin"]').count()).toBe(0)

    await signOut()
    expect(await nav().getAttribute('data-role')).toBe('anonymous')
    await signInWithForm(email, 'a long enough password')
    await page.waitForURL(`${baseUrl()}/`)
    await expect.poll(() => nav().getAttribute('data-role')).toBe('racer')
  })

  it('a shop signs in to the shop dashboard, which lists the shop\'s builds', async () => {
    const { db, close } = await testDb()
    const [shop] = await db.select().from(schema.shops).where(eq(schema.shops.slug, 'harrow-creek-engine-works'))
    const builds = await db.select().from(schema.builds).where(eq(schema.builds.shopId, shop!.id))
    await close()

    await signInWithForm(PERSONAS.shop, DEMO_PASSWORD)
    await page.waitForURL(`${baseUrl()}/dashboard`)
    await expect.poll(() => nav().getAttribute('data-role')).toBe('builder')
    expect(await page.locator('[data-test="nav-dashboard"]').innerText()).toBe('Shop dashboard')
    expect(await page.locator('[data-test="dashboard-shop"]').innerText()).toBe(shop!.shopName)
    expect(await page.locator('[data-test="own-build-row"]').count()).toBe(builds.length)
  })

  it('refuses a racer who opens the shop-only dashboard, whether typed or followed', async () => {
    await signInWithForm(PERSONAS.racer, DEMO_PASSWORD)
    await page.waitForURL(`${baseUrl()}/`)
    const res = await page.goto(`${baseUrl()}/dashboard`, { waitUntil: 'networkidle' })
    expect(res?.status()).toBe(403)
    expect(await page.locator('main').innerText()).toContain('This page is for shop (builder) accounts. You are signed in as a racer.')
    expect(await page.locator('[data-test="dashboard-shop"]').count()).toBe(0)
  })

  it('sends an anonymous visitor of the account page to sign in, and back after', async () => {
    await page.goto(`${baseUrl()}/account`, { waitUntil: 'networkidle' })
    await page.waitForURL(/\/sign-in\?next=(%2F|\/)account$/)
    await page.fill('#field-email', PERSONAS.otherShop)
    await page.fill('#field-password', DEMO_PASSWORD)
    await page.click('[data-test="password-form"] button[type="submit"]')
    await page.waitForURL(`${baseUrl()}/account`)
    await page.locator('[data-test="account-name"]').waitFor()
  })

  it('shows the shared schema\'s messages beside the fields before anything is sent', async () => {
    await page.goto(`${baseUrl()}/sign-up`, { waitUntil: 'networkidle' })
    const before = browser.requests.filter(u => u.includes('/api/account/sign-up')).length
    await page.click('[data-test="role-builder"]')
    await page.fill('#field-email', 'not-an-address')
    await page.fill('#field-password', 'short')
    await page.click('[data-test="sign-up-form"] button[type="submit"]')
    expect(await page.locator('[data-test="error-email"]').innerText()).toBe('Enter an e-mail address like name@example.com')
    expect(await page.locator('[data-test="error-password"]').innerText()).toBe('A password has at least 10 characters')
    expect(await page.locator('[data-test="error-shopName"]').innerText()).toContain('shop name')
    expect(browser.requests.filter(u => u.includes('/api/account/sign-up')).length).toBe(before)
  })

  it('a wrong password gets a message that does not say whether the e-mail is registered', async () => {
    await signInWithForm(PERSONAS.racer, 'certainly not it')
    const known = await page.locator('[data-test="notice-error"]').innerText()
    await signInWithForm('nobody-here@example.test', 'certainly not it')
    const unknown = await page.locator('[data-test="notice-error"]').innerText()
    expect(known).toBe(unknown)
    expect(known).toContain('do not match')
  })
})

describe('suspension and units, in Chromium', () => {
  it('an admin suspends an account, which then cannot sign in', async () => {
    const email = uniqueEmail('to-suspend')
    const { db, close } = await testDb()
    const { hash } = await import('@node-rs/argon2')
    await db.insert(schema.users).values({ email, name: 'Pell Ashdown', role: 'racer', passwordHash: await hash('a long enough password'), emailVerifiedAt: new Date() })
    await close()

    await signInWithForm(PERSONAS.admin, DEMO_PASSWORD)
    await page.waitForURL(`${baseUrl()}/admin`)
    expect(await page.locator('[data-test="nav-admin"]').count()).toBe(1)
    await page.click('[data-test="admin-nav-accounts"]')
    await page.waitForURL(`${baseUrl()}/admin/users`)
    await page.fill('[data-test="user-search"]', email)
    const row = page.locator(`[data-test="user-row-${email}"]`)
    await row.waitFor()
    page.once('dialog', d => void d.accept())
    await row.locator('[data-test="suspend"]').click()
    await row.locator('[data-test="restore"]').waitFor()
    expect(await row.innerText()).toContain('Suspended')
    await signOut()

    await signInWithForm(email, 'a long enough password')
    expect(await page.locator('[data-test="notice-error"]').innerText()).toContain('suspended')
    expect(await nav().getAttribute('data-role')).toBe('anonymous')
  })

  it('switches figures to metric: in this browser when anonymous, on the profile when signed in', async () => {
    await page.goto(`${baseUrl()}/`, { waitUntil: 'networkidle' })
    const power = page.locator('[data-test="card-power"]').first()
    expect(await power.innerText()).toMatch(/\d\s*hp$/)
    await page.click('[data-test="units-toggle-metric"]')
    expect(await power.innerText()).toMatch(/\d\s*kW$/)
    await page.reload({ waitUntil: 'networkidle' })
    await expect.poll(() => power.innerText()).toMatch(/\d\s*kW$/)

    await page.evaluate(() => localStorage.clear())
    await signInWithForm(PERSONAS.otherShop, DEMO_PASSWORD)
    await page.waitForURL(`${baseUrl()}/dashboard`)
    await page.goto(`${baseUrl()}/account`, { waitUntil: 'networkidle' })
    await page.click('[data-test="units-metric"]')
    await expect.poll(async () => {
      const { db, close } = await testDb()
      const [row] = await db.select().from(schema.users).where(eq(schema.users.email, PERSONAS.otherShop))
      await close()
      return row!.unitPreference
    }).toBe('metric')
    const res = await page.goto(`${baseUrl()}/`, { waitUntil: 'networkidle' })
    // Rendered on the server already in the profile's units.
    expect(await res!.text()).toMatch(/kW<\/span>/)
    expect(await page.locator('[data-test="card-power"]').first().innerText()).toMatch(/\d\s*kW$/)
    await page.click('[data-test="units-toggle-imperial"]')
    await expect.poll(async () => {
      const { db, close } = await testDb()
      const [row] = await db.select().from(schema.users).where(eq(schema.users.email, PERSONAS.otherShop))
      await close()
      return row!.unitPreference
    }).toBe('imperial')
  })
})

describe('sessions on the account page, in Chromium', () => {
  const meStatus = async (jar: CookieJar) => (await api('/api/me', { headers: { cookie: jar.header() } })).status

  /** A fresh account signed in twice: once through the API (another device) and once in this browser, on the account page. */
  async function twoSessions(name: string) {
    const account = await makeAccount({ role: 'racer', name })
    const other = await signIn('password', { email: account.email, password: account.password })
    expect(other.code).toBeNull()
    await signInWithForm(account.email, account.password)
    await page.waitForURL(`${baseUrl()}/`)
    await page.goto(`${baseUrl()}/account`, { waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="account-name"]').innerText()).toBe(name)
    return { account, otherJar: other.jar }
  }

  it('"Sign out other sessions" ends the other device\'s session and keeps this one signed in', async () => {
    const { otherJar } = await twoSessions('Tamsin Ardley')
    expect(await meStatus(otherJar)).toBe(200)
    await page.click('[data-test="sign-out-others"]')
    await expect.poll(() => page.locator('[data-test="account-sessions"]').innerText()).toContain('this one stays signed in')
    expect(await meStatus(otherJar)).toBe(401)
    await page.reload({ waitUntil: 'networkidle' })
    expect(await page.locator('[data-test="account-name"]').innerText()).toBe('Tamsin Ardley')
    expect(await nav().getAttribute('data-role')).toBe('racer')
  })

  it('"Sign out everywhere" ends both sessions and lands on the sign-in page', async () => {
    const { otherJar } = await twoSessions('Corin Maddox')
    await page.click('[data-test="sign-out-everywhere"]')
    await page.waitForURL(/\/sign-in\?signedOut=1$/)
    await expect.poll(() => nav().getAttribute('data-role')).toBe('anonymous')
    expect(await meStatus(otherJar)).toBe(401)
  })

  it('a page open in a session revoked elsewhere shows the signed-out state', async () => {
    const { otherJar } = await twoSessions('Ilse Varga')
    await page.goto(`${baseUrl()}/`, { waitUntil: 'networkidle' })
    expect((await api('/api/account/sign-out', json('POST', { scope: 'others' }, otherJar, '127.0.0.1'))).status).toBe(200)
    // Moving within the open page: the client still believes it is signed in until the server answers 401.
    await page.click('[data-test="nav-account"]')
    await expect.poll(() => page.locator('[data-test="account-signed-out"]').count()).toBe(1)
    expect(await page.locator('[data-test="account-signed-out"]').innerText()).toContain('signed out')
    await expect.poll(() => nav().getAttribute('data-role')).toBe('anonymous')
    // A fresh load goes to sign-in.
    await page.goto(`${baseUrl()}/account`, { waitUntil: 'networkidle' })
    expect(page.url()).toContain('/sign-in?next=')
  })
})
