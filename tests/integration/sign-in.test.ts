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
    const [row] = await ctx.db.select().from(schema.users).where(eq(schema.users.email, PERSONAS.shop))
    const { code, jar } = await signIn('password', { email: PERSONAS.shop, password: DEMO_PASSWORD })
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

  it('five wrong passwords from one address do not stop the owner\'s right password from another address; that address is refused for that account only', async () => {
    const account = await makeAccount({ role: 'racer' })
    const attacker = freshAddress()
    const codes: (string | null)[] = []
    for (let i = 0; i < 5; i++) codes.push((await signIn('password', { email: account.email, password: `wrong ${i}` }, attacker)).code)
    expect(codes).toEqual(Array(5).fill('invalid'))
    // The pair (this account, this address) is empty: even the right password is refused from here.
    expect((await signIn('password', { email: account.email, password: account.password }, attacker)).code).toBe('rate_limited')
    expect((await signIn('password', { email: account.email.toUpperCase(), password: account.password }, attacker)).code).toBe('rate_limited')
    // The owner, from anywhere else, signs in.
    const owner = await signIn('password', { email: account.email, password: account.password }, freshAddress())
    expect(owner.code).toBeNull()
    expect((await session(owner.jar))?.user.email).toBe(account.email)
    // The address itself is not stopped for other accounts (its own limit is 20).
    const other = await makeAccount({ role: 'racer' })
    expect((await signIn('password', { email: other.email, password: other.password }, attacker)).code).toBeNull()
  })

  it('50 wrong passwords spread over 50 addresses pause password sign-in for the account and mail the owner one notice; an e-mailed link still works', async () => {
    const account = await makeAccount({ role: 'racer', name: 'Wren Halloway' })
    for (let i = 0; i < 50; i++) expect((await signIn('password', { email: account.email, password: `spread guess ${i}` })).code).toBe('invalid')
    expect((await signIn('password', { email: account.email, password: account.password })).code).toBe('rate_limited')
    expect((await signIn('password', { email: account.email, password: 'one more guess' })).code).toBe('rate_limited')

    const notice = await waitForMail(account.email, m => m.subject.includes('paused'))
    expect(notice.text).toContain('Hello Wren Halloway')
    expect(notice.text).toContain('e-mailed sign-in link still works')
    expect(notice.text).toContain(`${baseUrl()}/sign-in`)
    // Another refusal after the notice sends none (one an hour at most).
    expect((await signIn('password', { email: account.email, password: account.password })).code).toBe('rate_limited')

    expect((await askLink(account.email)).status).toBe(202)
    const link = await waitForMail(account.email, m => m.subject.includes('sign-in link'))
    const viaLink = await signIn('link', { token: linkToken(link) })
    expect(viaLink.code).toBeNull()
    expect((await session(viaLink.jar))?.user.email).toBe(account.email)
    // The link mail went out after every refusal above; still exactly one notice.
    expect((await mailFor(account.email)).filter(m => m.subject.includes('paused'))).toHaveLength(1)
  })

  it('answers an exhausted unknown e-mail exactly as a registered one, and mails nobody', async () => {
    const unknown = `nobody-${freshAddress()}@example.test`
    await ctx.db.insert(schema.rateLimitBuckets).values({ key: `sign-in:account:${unknown}`, tokens: 0, updatedAt: new Date() })
    expect((await signIn('password', { email: unknown, password: 'a guess' })).code).toBe('rate_limited')
    const known = await makeAccount({ role: 'racer' })
    await ctx.db.insert(schema.rateLimitBuckets).values({ key: `sign-in:account:${known.email}`, tokens: 0, updatedAt: new Date() })
    expect((await signIn('password', { email: known.email, password: known.password })).code).toBe('rate_limited')
    await waitForMail(known.email, m => m.subject.includes('paused'))
    expect(await mailFor(unknown)).toEqual([])
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

  it('keeps the buckets in MariaDB, keyed by account, by address and by the pair', async () => {
    const address = freshAddress()
    await signIn('password', { email: 'bucket-check@example.test', password: 'guess' }, address)
    const rows = await ctx.db.select().from(schema.rateLimitBuckets)
    const keys = rows.map(r => r.key)
    expect(keys).toContain('sign-in:account:bucket-check@example.test')
    expect(keys).toContain(`sign-in:address:${address}`)
    expect(rows.find(r => r.key === `sign-in:pair:bucket-check@example.test|${address}`)!.tokens).toBeCloseTo(4, 2)
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
    const known = await askLink(PERSONAS.otherShop)
    const unknown = await askLink('never-registered@example.test')
    expect(known.status).toBe(202)
    expect(unknown.status).toBe(202)
    expect(known.body.message.replace(PERSONAS.otherShop, '<e-mail>')).toBe(unknown.body.message.replace('never-registered@example.test', '<e-mail>'))
    const mail = await waitForMail(PERSONAS.otherShop, m => m.subject.includes('sign-in link'))
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

  it('carries the page to return to inside the e-mailed link, and refuses a page on another site', async () => {
    const account = await makeAccount({ role: 'racer' })
    const res = await api('/api/account/sign-in-link', json('POST', { email: account.email, next: '/deals/orders/7' }, null, freshAddress()))
    expect(res.status).toBe(202)
    const mail = await waitForMail(account.email)
    expect(mail.text).toMatch(/\/sign-in\/link\?token=[A-Za-z0-9_-]+&next=%2Fdeals%2Forders%2F7/)
    for (const next of ['https://elsewhere.test/', '//elsewhere.test/deals']) {
      const bad = await api('/api/account/sign-in-link', json('POST', { email: account.email, next }, null, freshAddress()))
      expect(bad.status).toBe(400)
      expect(bad.body.message).toContain('path on this site')
    }
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
