// The session of a server-rendered page, read in process (server/utils/auth.ts `pageSession`) rather than
// through an internal request to Auth.js's /session route: the account is read afresh on every page, so
// a revoked session or a suspended account renders signed out at once and its cookie is removed; a page
// view sets no cookie of its own while the session is young, and an anonymous page sets none at all.
import { eq, sql } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { as, makeAccount, signIn, type CookieJar } from '../support/auth'
import { api, baseUrl, schema, testDb } from '../support/context'

let ctx: Awaited<ReturnType<typeof testDb>>
beforeAll(async () => {
  ctx = await testDb()
})
afterAll(async () => {
  await ctx.close()
})

const address = '10.81.0.1'
async function page(path: string, jar: CookieJar | null) {
  const res = await fetch(`${baseUrl()}${path}`, { headers: as(jar, address, { 'accept-encoding': 'identity' }), redirect: 'manual' })
  return { status: res.status, cookies: res.headers.getSetCookie(), html: await res.text() }
}
const accountName = (html: string) => /data-test="nav-account"[^>]*>\s*([^<]*?)\s*</.exec(html)?.[1] ?? null
const SESSION_COOKIE = /^authjs\.session-token=/

async function signedInRacer(name: string) {
  const account = await makeAccount({ role: 'racer', name })
  const { code, jar } = await signIn('password', { email: account.email, password: account.password }, address)
  expect(code).toBeNull()
  return { ...account, jar }
}

describe('the session of a server-rendered page', () => {
  it('shows the signed-in account, read afresh, and sets no cookie on a young session\'s page view', async () => {
    const racer = await signedInRacer('Page Session Racer')
    const first = await page('/deals', racer.jar)
    expect(first.status).toBe(200)
    expect(accountName(first.html)).toBe('Page Session Racer')
    expect(first.cookies).toEqual([])
    // A new name shows on the next page: the account row is read on every page, not kept in the cookie.
    await ctx.db.update(schema.users).set({ name: 'Renamed Session Racer' }).where(eq(schema.users.id, racer.id))
    expect(accountName((await page('/deals', racer.jar)).html)).toBe('Renamed Session Racer')
  })

  it('renders a revoked session signed out on its next page and removes its cookie; its API calls are refused', async () => {
    const racer = await signedInRacer('Revoked Session Racer')
    expect(accountName((await page('/account', racer.jar)).html)).toBe('Revoked Session Racer')
    // What a password change or a sign-out everywhere does: the account's session version moves on.
    await ctx.db.update(schema.users).set({ sessionVersion: sql`${schema.users.sessionVersion} + 1` }).where(eq(schema.users.id, racer.id))
    const after = await page('/deals', racer.jar)
    expect(after.status).toBe(200)
    expect(accountName(after.html)).toBeNull()
    expect(after.html).toContain('data-test="nav-sign-in"')
    const cleared = after.cookies.find(c => SESSION_COOKIE.test(c))
    expect(cleared).toMatch(/^authjs\.session-token=;.*Max-Age=0/i)
    expect((await api('/api/me/notifications', { headers: as(racer.jar, address) })).status).toBe(401)
  })

  it('renders a suspended account signed out on its next page', async () => {
    const racer = await signedInRacer('Suspended Session Racer')
    expect(accountName((await page('/deals', racer.jar)).html)).toBe('Suspended Session Racer')
    await ctx.db.update(schema.users).set({ suspendedAt: new Date() }).where(eq(schema.users.id, racer.id))
    const after = await page('/deals', racer.jar)
    expect(accountName(after.html)).toBeNull()
    expect(after.cookies.some(c => /^authjs\.session-token=;/.test(c))).toBe(true)
  })

  it('removes a session cookie that does not decode, and sets no cookie on an anonymous page', async () => {
    const forged = await fetch(`${baseUrl()}/deals`, { headers: { 'cookie': 'authjs.session-token=not-a-token', 'x-forwarded-for': address } })
    expect(forged.status).toBe(200)
    expect(accountName(await forged.text())).toBeNull()
    expect(forged.headers.getSetCookie().some(c => /^authjs\.session-token=;/.test(c))).toBe(true)
    const anonymous = await page('/sign-in', null)
    expect(anonymous.status).toBe(200)
    expect(anonymous.html).toContain('data-test="password-form"')
    expect(anonymous.cookies).toEqual([])
  })
})
