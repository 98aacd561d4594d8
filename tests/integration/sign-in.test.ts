import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { CookieJar, DEMO_PASSWORD, freshAddress, json, linkToken, makeAccount, PERSONAS, session, signIn, waitForMail } from '../support/auth'
import { api, baseUrl, mailFor, schema, testDb } from '../support/context'

let ctx: Awaited<ReturnType<typeof testDb>>
beforeAll(async () => {
  ctx = await testDb()
})
afterAll(async () => {
  await ctx.close()
})

const askLink = (email: string, address = freshAddress()) => api('/api/account/sign-in-link', json('POST', { email }, null, address))

describe('password sign-in through Auth.js', () => {
  it('gives a session that carries id, name and role, and sign-out ends it', async () => {
    const [row] = await ctx.db.select().from(schema.users).where(eq(schema.users.email, PERSONAS.builder))
    const { code, jar } = await signIn('password', { email: PERSONAS.builder, password: DEMO_PASSWORD })
    expect(code).toBeNull()
    expect(jar.has('authjs.session-token')).toBe(true)
    expect((await session(jar))?.user).toEqual({ id: row!.id, name: row!.name, email: row!.email, role: 'builder', units: row!.unitPreference })

    const csrf = await api('/api/auth/csrf', { headers: { cookie: jar.header() } })
    const out = await fetch(`${baseUrl()}/api/auth/signout`, {
      method: 'POST',
      redirect: 'manual',
      headers: { 'cookie': jar.header(), 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ csrfToken: csrf.body.csrfToken, json: 'true' }).toString(),
    })
    jar.take(out.headers)
    expect(jar.has('authjs.session-token')).toBe(false)
    expect(await session(jar)).toBeNull()
  })

  it('answers a wrong password and an unknown e-mail with the same refusal', async () => {
    const wrong = await signIn('password', { email: PERSONAS.racer, password: 'not the password' })
    const unknown = await signIn('password', { email: 'nobody-at-all@example.test', password: 'not the password' })
    const malformed = await signIn('password', { email: 'not an e-mail', password: '' })
    expect([wrong.code, unknown.code, malformed.code]).toEqual(['invalid', 'invalid', 'invalid'])
    expect(await session(wrong.jar)).toBeNull()
  })

  it('stops an account after 5 wrong passwords, even with the right one next, while other accounts still sign in', async () => {
    const account = await makeAccount({ role: 'racer' })
    const codes: (string | null)[] = []
    // A new client address for every attempt: only the per-account limit is in play.
    for (let i = 0; i < 5; i++) codes.push((await signIn('password', { email: account.email, password: `wrong ${i}` })).code)
    expect(codes).toEqual(Array(5).fill('invalid'))
    expect((await signIn('password', { email: account.email, password: account.password })).code).toBe('rate_limited')
    expect((await signIn('password', { email: account.email.toUpperCase(), password: account.password })).code).toBe('rate_limited')
    const other = await makeAccount({ role: 'racer' })
    expect((await signIn('password', { email: other.email, password: other.password })).code).toBeNull()
  })

  it('counts only failures: successful sign-ins give their attempt back', async () => {
    const account = await makeAccount({ role: 'racer' })
    for (let i = 0; i < 8; i++) expect((await signIn('password', { email: account.email, password: account.password })).code).toBeNull()
  })

  it('stops a client address after 20 wrong passwords across any accounts, and only that address', async () => {
    const address = freshAddress()
    for (let i = 0; i < 20; i++) expect((await signIn('password', { email: `guess-${i}@example.test`, password: 'guess' }, address)).code).toBe('invalid')
    const account = await makeAccount({ role: 'racer' })
    expect((await signIn('password', { email: account.email, password: account.password }, address)).code).toBe('rate_limited')
    expect((await signIn('password', { email: account.email, password: account.password }, freshAddress())).code).toBeNull()
  })

  it('keeps the buckets in MariaDB, keyed by account and by address', async () => {
    const address = freshAddress()
    await signIn('password', { email: 'bucket-check@example.test', password: 'guess' }, address)
    const rows = await ctx.db.select().from(schema.rateLimitBuckets)
    const keys = rows.map(r => r.key)
    expect(keys).toContain('sign-in:account:bucket-check@example.test')
    expect(keys).toContain(`sign-in:address:${address}`)
    expect(rows.find(r => r.key === `sign-in:address:${address}`)!.tokens).toBeCloseTo(19, 2)
  })

  it('refuses a tampered or foreign session cookie with 401', async () => {
    const { jar } = await signIn('password', { email: PERSONAS.racer, password: DEMO_PASSWORD })
    const tampered = jar.header().replace(/authjs\.session-token=([^;]+)/, (_m, v: string) => `authjs.session-token=${v.slice(0, -4)}AAAA`)
    expect((await api('/api/me', { headers: { cookie: tampered } })).status).toBe(401)
    expect((await api('/api/me', { headers: { cookie: 'authjs.session-token=made-up' } })).status).toBe(401)
    expect((await api('/api/me', { headers: { cookie: jar.header() } })).status).toBe(200)
  })
})

describe('e-mailed sign-in links', () => {
  it('answers the same for a registered and an unknown address, and mails only the registered one', async () => {
    const known = await askLink(PERSONAS.otherBuilder)
    const unknown = await askLink('never-registered@example.test')
    expect(known.status).toBe(202)
    expect(unknown.status).toBe(202)
    expect(known.body.message.replace(PERSONAS.otherBuilder, '<e-mail>')).toBe(unknown.body.message.replace('never-registered@example.test', '<e-mail>'))
    const mail = await waitForMail(PERSONAS.otherBuilder, m => m.subject.includes('sign-in link'))
    expect(mail.text).toContain('/sign-in/link?token=')
    expect(await mailFor('never-registered@example.test')).toEqual([])
  })

  it('signs in once with the link, then refuses it; an expired link is refused', async () => {
    const account = await makeAccount({ role: 'builder' })
    expect((await askLink(account.email)).status).toBe(202)
    const token = linkToken(await waitForMail(account.email))
    const first = await signIn('link', { token })
    expect(first.code).toBeNull()
    expect((await session(first.jar))?.user.role).toBe('builder')
    expect((await signIn('link', { token })).code).toBe('link_invalid')

    await askLink(account.email)
    const second = linkToken(await waitForMail(account.email, m => linkToken(m) !== token))
    await ctx.db.update(schema.authTokens).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(schema.authTokens.userId, account.id))
    expect((await signIn('link', { token: second })).code).toBe('link_invalid')
    expect((await signIn('link', { token: 'x'.repeat(43) })).code).toBe('link_invalid')
    expect((await signIn('link', { token: 'short' })).code).toBe('link_invalid')
  })

  it('limits links per address asked for: 3, then 429', async () => {
    const account = await makeAccount({ role: 'racer' })
    const statuses = []
    for (let i = 0; i < 4; i++) statuses.push((await askLink(account.email)).status)
    expect(statuses).toEqual([202, 202, 202, 429])
  })

  it('refuses bad input with a 400 that names the e-mail', async () => {
    const res = await api('/api/account/sign-in-link', json('POST', { email: 'nope' }, null, freshAddress()))
    expect(res.status).toBe(400)
    expect(res.body.message).toContain('e-mail address')
  })
})

describe('a session is checked against the account on every request', () => {
  it('stops working once the account row is gone', async () => {
    const account = await makeAccount({ role: 'racer' })
    const { jar } = await signIn('password', { email: account.email, password: account.password })
    expect((await api('/api/me', { headers: { cookie: jar.header() } })).status).toBe(200)
    await ctx.db.delete(schema.users).where(eq(schema.users.id, account.id))
    expect((await api('/api/me', { headers: { cookie: jar.header() } })).status).toBe(401)
    expect(await session(jar)).toBeNull()
  })

  it('anonymous requests to signed-in routes get 401 with a message', async () => {
    const res = await api('/api/me', { headers: { cookie: new CookieJar().header() } })
    expect(res.status).toBe(401)
    expect(res.body.message).toBe('Sign in to continue.')
  })
})
