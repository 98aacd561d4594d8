import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { CookieJar } from '../support/auth'
import { freshAddress, issuePaths, json, linkToken, makeAccount, session, signIn, uniqueEmail, waitForMail } from '../support/auth'
import { api, schema, testDb } from '../support/context'

let ctx: Awaited<ReturnType<typeof testDb>>
beforeAll(async () => {
  ctx = await testDb()
})
afterAll(async () => {
  await ctx.close()
})

async function signedInAccount(role: 'racer' | 'builder' = 'racer') {
  const account = await makeAccount({ role })
  const { code, jar } = await signIn('password', { email: account.email, password: account.password })
  expect(code).toBeNull()
  return { ...account, jar }
}
const send = (method: string, path: string, body: unknown, jar: CookieJar) => api(path, json(method, body, jar, freshAddress()))
const userRow = async (id: number) => (await ctx.db.select().from(schema.users).where(eq(schema.users.id, id)))[0]!

describe('GET and PATCH /api/me', () => {
  it('answers the account with its shop, and saves the name and the unit preference', async () => {
    const me = await signedInAccount('builder')
    const got = await api('/api/me', { headers: { cookie: me.jar.header() } })
    expect(got.status).toBe(200)
    expect(got.body).toMatchObject({ id: me.id, email: me.email, role: 'builder', units: 'imperial', emailVerified: true, hasPassword: true, shop: { slug: me.shopSlug } })
    expect(got.body).not.toHaveProperty('passwordHash')

    const res = await send('PATCH', '/api/me', { name: '  Ada Quill  ', unitPreference: 'metric' }, me.jar)
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ name: 'Ada Quill', units: 'metric' })
    expect(await userRow(me.id)).toMatchObject({ name: 'Ada Quill', unitPreference: 'metric' })
    expect((await session(me.jar))?.user).toMatchObject({ name: 'Ada Quill', units: 'metric' })
  })

  it.each([
    [{ unitPreference: 'furlongs' }, 'unitPreference'],
    [{ name: 'x' }, 'name'],
    [{}, ''],
    [{ role: 'admin' }, ''],
  ])('refuses %j with a 400 and changes nothing', async (body, field) => {
    const me = await signedInAccount()
    const before = await userRow(me.id)
    const res = await send('PATCH', '/api/me', body, me.jar)
    expect(res.status).toBe(400)
    if (field) expect(res.body.message).toContain(field)
    const after = await userRow(me.id)
    expect(after).toMatchObject({ name: before.name, role: 'racer', unitPreference: before.unitPreference })
  })
})

describe('POST /api/me/password', () => {
  it('asks for the current password, then the new one signs in and the old one does not', async () => {
    const me = await signedInAccount()
    const missing = await send('POST', '/api/me/password', { newPassword: 'a brand new passphrase' }, me.jar)
    expect(missing.status).toBe(400)
    expect(issuePaths(missing.body)).toEqual(['currentPassword'])
    const wrong = await send('POST', '/api/me/password', { currentPassword: 'not it at all', newPassword: 'a brand new passphrase' }, me.jar)
    expect(wrong.status).toBe(400)
    expect(wrong.body.message).toContain('not your current password')
    const short = await send('POST', '/api/me/password', { currentPassword: me.password, newPassword: 'short' }, me.jar)
    expect(short.status).toBe(400)
    expect(short.body.message).toContain('at least 10 characters')
    const hashBefore = (await userRow(me.id)).passwordHash

    const ok = await send('POST', '/api/me/password', { currentPassword: me.password, newPassword: 'a brand new passphrase' }, me.jar)
    expect(ok.status).toBe(200)
    expect((await userRow(me.id)).passwordHash).not.toBe(hashBefore)
    expect((await signIn('password', { email: me.email, password: 'a brand new passphrase' })).code).toBeNull()
    expect((await signIn('password', { email: me.email, password: me.password })).code).toBe('invalid')
  })

  it('lets a session that began with an e-mailed link set a new password without the old one (the forgotten-password path)', async () => {
    const account = await makeAccount({ role: 'racer' })
    await api('/api/account/sign-in-link', json('POST', { email: account.email }, null, freshAddress()))
    const { jar } = await signIn('link', { token: linkToken(await waitForMail(account.email)) })
    const res = await send('POST', '/api/me/password', { newPassword: 'remembered at last' }, jar)
    expect(res.status).toBe(200)
    expect((await signIn('password', { email: account.email, password: 'remembered at last' })).code).toBeNull()
  })
})

const meStatus = async (jar: CookieJar) => (await api('/api/me', { headers: { cookie: jar.header() } })).status
const signOutSessions = (scope: unknown, jar: CookieJar) => send('POST', '/api/account/sign-out', { scope }, jar)
/** A second sign-in of the same account, as from another device. */
async function secondDevice(email: string, password: string) {
  const { code, jar } = await signIn('password', { email, password })
  expect(code).toBeNull()
  return jar
}

describe('revoking sessions', () => {
  it('a password change ends every earlier cookie on the next request; the caller carries on with a fresh cookie and a new sign-in works', async () => {
    const me = await signedInAccount()
    const laptop = await secondDevice(me.email, me.password)
    const stolenCopy = me.jar.header()
    expect(await meStatus(laptop)).toBe(200)

    const res = await send('POST', '/api/me/password', { currentPassword: me.password, newPassword: 'a brand new passphrase' }, me.jar)
    expect(res.status).toBe(200)
    expect(res.headers.getSetCookie()).toHaveLength(1)
    me.jar.take(res.headers)

    const refused = await api('/api/me', { headers: { cookie: laptop.header() } })
    expect(refused.status).toBe(401)
    expect(refused.body.message).toContain('signed out')
    expect(await session(laptop)).toBeNull()
    // The caller's cookie from before the change is revoked too; the one the change answered with is not.
    expect((await api('/api/me', { headers: { cookie: stolenCopy } })).status).toBe(401)
    expect(await meStatus(me.jar)).toBe(200)
    expect((await session(me.jar))?.user.email).toBe(me.email)

    const fresh = await secondDevice(me.email, 'a brand new passphrase')
    expect(await meStatus(fresh)).toBe(200)
    expect((await userRow(me.id)).sessionVersion).toBe(1)
  })

  it('"sign out other sessions" ends the other cookie and keeps the caller\'s; "sign out everywhere" then ends both', async () => {
    const me = await signedInAccount()
    const phone = await secondDevice(me.email, me.password)

    const others = await signOutSessions('others', me.jar)
    expect(others.status).toBe(200)
    expect(others.body.scope).toBe('others')
    expect(others.headers.getSetCookie()).toHaveLength(1)
    me.jar.take(others.headers)
    expect(await meStatus(phone)).toBe(401)
    expect(await meStatus(me.jar)).toBe(200)
    // Auth.js reads the renewed cookie as its own: the pages' session answers and rolls it on.
    expect((await session(me.jar))?.user.id).toBe(me.id)

    const tablet = await secondDevice(me.email, me.password)
    expect(await meStatus(tablet)).toBe(200)
    const keptHeader = me.jar.header()
    const everywhere = await signOutSessions('everywhere', me.jar)
    expect(everywhere.status).toBe(200)
    me.jar.take(everywhere.headers)
    expect(me.jar.has('authjs.session-token')).toBe(false)
    expect(await meStatus(tablet)).toBe(401)
    expect((await api('/api/me', { headers: { cookie: keptHeader } })).status).toBe(401)
    expect(await session(tablet)).toBeNull()
    expect((await userRow(me.id)).sessionVersion).toBe(2)
    // Signing in again afterwards works as before.
    expect(await meStatus(await secondDevice(me.email, me.password))).toBe(200)
  })

  it('a plain sign-out ends only that cookie', async () => {
    const me = await signedInAccount()
    const phone = await secondDevice(me.email, me.password)
    const csrf = await api('/api/auth/csrf', { headers: { cookie: phone.header() } })
    phone.take(csrf.headers)
    const out = await api('/api/auth/signout', {
      method: 'POST',
      headers: { 'cookie': phone.header(), 'content-type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ csrfToken: csrf.body.csrfToken, json: 'true' }).toString(),
    })
    phone.take(out.headers)
    expect(await meStatus(phone)).toBe(401)
    expect(await meStatus(me.jar)).toBe(200)
    expect((await userRow(me.id)).sessionVersion).toBe(0)
  })

  it('refuses a stranger with 401 and a missing or unknown scope with 400, revoking nothing', async () => {
    const me = await signedInAccount()
    expect((await api('/api/account/sign-out', json('POST', { scope: 'others' }, null, freshAddress()))).status).toBe(401)
    for (const body of [{}, { scope: 'all-but-one' }, { scope: 'others', extra: 1 }]) {
      const res = await send('POST', '/api/account/sign-out', body, me.jar)
      expect(res.status).toBe(400)
    }
    const noBody = await api('/api/account/sign-out', { method: 'POST', headers: { 'cookie': me.jar.header(), 'x-forwarded-for': freshAddress() } })
    expect(noBody.status).toBe(400)
    expect((await userRow(me.id)).sessionVersion).toBe(0)
    expect(await meStatus(me.jar)).toBe(200)
  })
})

describe('POST /api/me/email', () => {
  it('moves the account only when the link sent to the new address is used, and tells the old address', async () => {
    const me = await signedInAccount()
    const next = uniqueEmail('moved')
    const res = await send('POST', '/api/me/email', { email: next, currentPassword: me.password }, me.jar)
    expect(res.status).toBe(202)
    expect((await userRow(me.id)).email).toBe(me.email)
    const [pending] = await ctx.db.select().from(schema.authTokens).where(and(eq(schema.authTokens.userId, me.id), eq(schema.authTokens.purpose, 'change_email')))
    expect(pending!.newEmail).toBe(next)

    const used = await signIn('link', { token: linkToken(await waitForMail(next)) })
    expect(used.code).toBeNull()
    expect((await userRow(me.id)).email).toBe(next)
    const notice = await waitForMail(me.email, m => m.subject.includes('was changed'))
    expect(notice.text).toContain(next)
    expect((await signIn('password', { email: next, password: me.password })).code).toBeNull()
  })

  it('answers the same for an address another account has, and moves nothing', async () => {
    const me = await signedInAccount()
    const other = await makeAccount({ role: 'racer' })
    const res = await send('POST', '/api/me/email', { email: other.email, currentPassword: me.password }, me.jar)
    expect(res.status).toBe(202)
    const notice = await waitForMail(other.email, m => m.subject.includes('wanted this address'))
    expect(notice.text).not.toMatch(/token=/)
    expect((await userRow(me.id)).email).toBe(me.email)
  })

  it.each([
    [{ email: 'nope' }, 'email'],
    [{ email: uniqueEmail('x') }, 'currentPassword'],
    [{ email: uniqueEmail('x'), currentPassword: 'wrong password' }, 'currentPassword'],
  ])('refuses %j with a 400 naming %s', async (body, field) => {
    const me = await signedInAccount()
    const res = await send('POST', '/api/me/email', body, me.jar)
    expect(res.status).toBe(400)
    expect(issuePaths(res.body)).toContain(field)
  })

  it('refuses the address the account already has', async () => {
    const me = await signedInAccount()
    const res = await send('POST', '/api/me/email', { email: me.email, currentPassword: me.password }, me.jar)
    expect(res.status).toBe(400)
    expect(res.body.message).toContain('already your e-mail')
  })
})

describe('a shop owner\'s routes', () => {
  it('lists only the caller\'s own builds, drafts included', async () => {
    const me = await signedInAccount('builder')
    const [shop] = await ctx.db.select().from(schema.shops).where(eq(schema.shops.slug, me.shopSlug!))
    const [template] = await ctx.db.select().from(schema.builds).limit(1)
    const { id: _id, slug: _slug, createdAt: _c, updatedAt: _u, ...columns } = template!
    await ctx.db.insert(schema.builds).values({ ...columns, shopId: shop!.id, slug: `own-draft-${shop!.id}`, status: 'draft', publishedAt: null })
    const res = await api('/api/me/builds', { headers: { cookie: me.jar.header() } })
    expect(res.status).toBe(200)
    expect(res.body.shop.slug).toBe(me.shopSlug)
    expect(res.body.builds).toHaveLength(1)
    expect(res.body.builds[0]).toMatchObject({ slug: `own-draft-${shop!.id}`, status: 'draft', pulls: 0 })
  })

  it('changes the shop profile for its owner (the slug stays) and refuses another shop with 403', async () => {
    const owner = await signedInAccount('builder')
    const stranger = await signedInAccount('builder')
    const refused = await send('PATCH', `/api/builders/${owner.shopSlug}`, { shopName: 'Taken Over' }, stranger.jar)
    expect(refused.status).toBe(403)
    const ok = await send('PATCH', `/api/builders/${owner.shopSlug}`, { shopName: 'Larkspur Engine Room', bio: 'Small shop, big records.' }, owner.jar)
    expect(ok.status).toBe(200)
    expect(ok.body).toMatchObject({ slug: owner.shopSlug, shopName: 'Larkspur Engine Room', bio: 'Small shop, big records.' })
    const [row] = await ctx.db.select().from(schema.shops).where(eq(schema.shops.slug, owner.shopSlug!))
    expect(row!.shopName).toBe('Larkspur Engine Room')
    const bad = await send('PATCH', `/api/builders/${owner.shopSlug}`, { region: 'x' }, owner.jar)
    expect(bad.status).toBe(400)
    expect(bad.body.message).toContain('region')
  })
})
