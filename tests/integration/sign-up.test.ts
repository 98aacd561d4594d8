import { count, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { freshAddress, issuePaths, json, linkToken, session, signIn, uniqueEmail, waitForMail } from '../support/auth'
import { api, mailFor, schema, testDb } from '../support/context'

let ctx: Awaited<ReturnType<typeof testDb>>
beforeAll(async () => {
  ctx = await testDb()
})
afterAll(async () => {
  await ctx.close()
})

const userByEmail = async (email: string) => (await ctx.db.select().from(schema.users).where(eq(schema.users.email, email)))[0]
const signUp = (body: unknown, address = freshAddress()) => api('/api/account/sign-up', json('POST', body, null, address))

describe('POST /api/account/sign-up', () => {
  it('makes an unconfirmed racer with an argon2id hash and e-mails a link that confirms and signs in, once', async () => {
    const email = uniqueEmail('racer')
    const res = await signUp({ role: 'racer', name: 'Wren Halloway', email: email.toUpperCase(), password: 'long enough words' })
    expect(res.status).toBe(202)
    expect(res.body.message).toContain(email)

    const user = await userByEmail(email)
    expect(user).toMatchObject({ role: 'racer', name: 'Wren Halloway', emailVerifiedAt: null, suspendedAt: null })
    // PHC string of Argon2id (RFC 9106), as @node-rs/argon2 writes it.
    expect(user!.passwordHash).toMatch(/^\$argon2id\$v=19\$m=\d+,t=\d+,p=\d+\$/)
    expect(user!.passwordHash).not.toContain('long enough words')

    const mail = await waitForMail(email, m => m.subject.includes('Confirm your e-mail'))
    const token = linkToken(mail)
    // Only the SHA-256 of the token is stored.
    const [stored] = await ctx.db.select().from(schema.authTokens).where(eq(schema.authTokens.userId, user!.id))
    expect(stored!.tokenHash).toMatch(/^[0-9a-f]{64}$/)
    expect(stored!.tokenHash).not.toBe(token)
    expect(stored!.purpose).toBe('verify_email')

    const before = await signIn('password', { email, password: 'long enough words' })
    expect(before.code).toBe('unverified')

    // The refused sign-in sent a fresh link and retired the first one.
    const fresh = await waitForMail(email, m => m.subject.includes('Confirm your e-mail') && linkToken(m) !== token)
    expect((await signIn('link', { token })).code).toBe('link_invalid')
    const used = await signIn('link', { token: linkToken(fresh) })
    expect(used.code).toBeNull()
    expect((await session(used.jar))?.user).toMatchObject({ id: user!.id, name: 'Wren Halloway', email, role: 'racer' })
    expect((await userByEmail(email))!.emailVerifiedAt).toBeInstanceOf(Date)

    expect((await signIn('link', { token: linkToken(fresh) })).code).toBe('link_invalid')
    expect((await signIn('password', { email, password: 'long enough words' })).code).toBeNull()
  })

  it('makes a shop and the shop profile together, with a unique slug from the shop name', async () => {
    const first = uniqueEmail('shop')
    const second = uniqueEmail('shop')
    const suffix = Date.now().toString(36)
    const shopName = `Saltmarsh Cylinder & Head ${suffix}`
    expect((await signUp({ role: 'builder', name: 'Ottilie Brand', email: first, password: 'long enough words', shopName, region: 'Tidewater' })).status).toBe(202)
    expect((await signUp({ role: 'builder', name: 'Casimir Vell', email: second, password: 'long enough words', shopName, region: 'Uplands' })).status).toBe(202)

    const shopRows = await Promise.all([first, second].map(async (email) => {
      const user = await userByEmail(email)
      expect(user!.role).toBe('builder')
      return (await ctx.db.select().from(schema.shops).where(eq(schema.shops.userId, user!.id)))[0]!
    }))
    expect(shopRows[0]!.slug).toBe(`saltmarsh-cylinder-and-head-${suffix}`)
    expect(shopRows[1]!.slug).toBe(`saltmarsh-cylinder-and-head-${suffix}-2`)
    expect(shopRows.map(s => s.region)).toEqual(['Tidewater', 'Uplands'])
  })

  it('answers an e-mail that is already registered exactly like a new one, and tells only the inbox', async () => {
    const email = 'alma@racer.test'
    const [before] = await ctx.db.select({ n: count() }).from(schema.users)
    const fresh = await signUp({ role: 'racer', name: 'Someone', email: uniqueEmail('new'), password: 'long enough words' })
    const taken = await signUp({ role: 'racer', name: 'Someone', email, password: 'long enough words' })
    expect(taken.status).toBe(fresh.status)
    expect(Object.keys(taken.body)).toEqual(Object.keys(fresh.body))
    expect(taken.body.message.replace(email, '<e-mail>')).toBe(fresh.body.message.replace(/\S+@example\.test/, '<e-mail>'))
    const [after] = await ctx.db.select({ n: count() }).from(schema.users)
    expect(after!.n).toBe(before!.n + 1)
    const notice = await waitForMail(email, m => m.subject.includes('already have'))
    expect(notice.text).not.toMatch(/token=/)
  })

  it.each([
    [{ role: 'racer', name: 'Al', email: 'not-an-address', password: 'long enough words' }, 'email', 'e-mail address'],
    [{ role: 'racer', name: 'Al Brandt', email: uniqueEmail('short'), password: 'short' }, 'password', 'at least 10'],
    [{ role: 'racer', name: '', email: uniqueEmail('noname'), password: 'long enough words' }, 'name', 'name'],
    [{ role: 'admin', name: 'Al Brandt', email: uniqueEmail('admin'), password: 'long enough words' }, 'role', 'race or run a shop'],
    [{ role: 'builder', name: 'Al Brandt', email: uniqueEmail('noshop'), password: 'long enough words', region: 'Flats' }, 'shopName', 'shop name'],
  ])('refuses %j with a 400 naming the field, and writes nothing', async (body, field, words) => {
    const [before] = await ctx.db.select({ n: count() }).from(schema.users)
    const res = await signUp(body)
    expect(res.status).toBe(400)
    expect(issuePaths(res.body)).toContain(field)
    expect(res.body.message.toLowerCase()).toContain(words.toLowerCase())
    const [after] = await ctx.db.select({ n: count() }).from(schema.users)
    expect(after!.n).toBe(before!.n)
    if (typeof body.email === 'string' && body.email.includes('@')) expect(await mailFor(body.email)).toEqual([])
  })

  it('limits sign-ups per client address and answers 429, not 5xx', async () => {
    const address = freshAddress()
    const statuses: number[] = []
    for (let i = 0; i < 11; i++) statuses.push((await signUp({ role: 'racer', name: 'Flood Test', email: uniqueEmail('flood'), password: 'long enough words' }, address)).status)
    expect(statuses.slice(0, 10)).toEqual(Array(10).fill(202))
    expect(statuses[10]).toBe(429)
    expect((await signUp({ role: 'racer', name: 'Other Net', email: uniqueEmail('other'), password: 'long enough words' })).status).toBe(202)
  })
})
