// Sign-in links and the sign-in rate limits under concurrent requests, against the real MariaDB: many
// links asked for one account at once, links used while others are issued, and wrong passwords that
// create many new rate-limit buckets at the same moment. None of them may end in a server error (a
// lost lock conflict is MariaDB's ER_LOCK_DEADLOCK 1213 or ER_LOCK_WAIT_TIMEOUT 1205), and the rows
// left must be exactly what the same requests one after another would leave.
import { and, eq, inArray, like } from 'drizzle-orm'
import { drizzle } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { bucketKey, POLICIES, signInBuckets, takeTokens } from '../../server/auth/rate-limit'
import type { Database } from '../../server/database/types'
import { consumeLink, hashToken, issueLink } from '../../server/services/accounts'
import { as, CookieJar, freshAddress, json, makeAccount, uniqueEmail } from '../support/auth'
import { api, baseUrl, schema } from '../support/context'

let pool: mysql.Pool
let db: Database
beforeAll(() => {
  // A pool, so the services' transactions really run side by side.
  pool = mysql.createPool({ uri: inject('databaseUrl'), connectionLimit: 10, timezone: 'Z' })
  db = drizzle(pool, { schema, mode: 'default' }) as unknown as Database
})
afterAll(async () => {
  await pool.end()
})

/**
 * Links of the other two kinds, so the account's sign_in links fall in a gap of the index between
 * rows of its own (auth_tokens_user_idx is user, purpose): the shape in which two links asked for at
 * once each locked that gap and then waited to insert into it.
 */
async function otherLinks(userId: number) {
  await issueLink(db, { userId, purpose: 'verify_email' })
  await issueLink(db, { userId, purpose: 'change_email', newEmail: uniqueEmail('other') })
}

const tokensOf = (userId: number) => db.select().from(schema.authTokens).where(and(eq(schema.authTokens.userId, userId), eq(schema.authTokens.purpose, 'sign_in')))

/**
 * One sign-in through Auth.js as the pages do it (CSRF token, then the provider's callback), keeping
 * the HTTP status as well as the refusal code, so a server error cannot pass for a refusal.
 */
async function attempt(provider: 'password' | 'link', fields: Record<string, string>, address: string) {
  const jar = new CookieJar()
  const csrf = await fetch(`${baseUrl()}/api/auth/csrf`, { headers: as(jar, address) })
  jar.take(csrf.headers)
  const { csrfToken } = await csrf.json() as { csrfToken: string }
  const res = await fetch(`${baseUrl()}/api/auth/callback/${provider}`, {
    method: 'POST',
    redirect: 'manual',
    headers: as(jar, address, { 'content-type': 'application/x-www-form-urlencoded' }),
    body: new URLSearchParams({ ...fields, csrfToken, callbackUrl: `${baseUrl()}/`, json: 'true' }).toString(),
  })
  const text = await res.text()
  let code: string | null = `unreadable answer: ${text.slice(0, 80)}`
  try {
    const params = new URL((JSON.parse(text) as { url: string }).url).searchParams
    code = params.get('error') ? (params.get('code') ?? params.get('error')) : null
  }
  catch {
    // Kept as the code above: the assertions name it.
  }
  return { status: res.status, code }
}

const tally = (values: (string | number | null)[]) => values.reduce<Record<string, number>>((acc, v) => ({ ...acc, [String(v)]: (acc[String(v)] ?? 0) + 1 }), {})

describe('sign-in links asked for and used at the same moment', () => {
  it('answers ten parallel requests for one account with 202 or the limit\'s 429, never a 500, and leaves one working link', async () => {
    const account = await makeAccount({ role: 'racer' })
    await otherLinks(account.id)
    const answers = await Promise.all(Array.from({ length: 10 }, () =>
      api('/api/account/sign-in-link', json('POST', { email: account.email }, null, freshAddress()))))
    const statuses = answers.map(a => a.status)
    // Each request comes from its own address, so only the account's bucket counts: it holds 3 (POLICIES.linkAccount).
    expect(tally(statuses)).toEqual({ 202: POLICIES.linkAccount.capacity, 429: 10 - POLICIES.linkAccount.capacity })
    const rows = await tokensOf(account.id)
    expect(rows).toHaveLength(POLICIES.linkAccount.capacity)
    // A new link ends the earlier unused ones: exactly one is left working, the newest.
    const unused = rows.filter(r => r.usedAt === null)
    expect(unused).toHaveLength(1)
    expect(unused[0]!.id).toBe(Math.max(...rows.map(r => r.id)))
  })

  it('issues ten links for one account at once (service), three rounds: every call succeeds, every link a row, one of them unused', async () => {
    const account = await makeAccount({ role: 'racer' })
    await otherLinks(account.id)
    const tokens: string[] = []
    for (let round = 0; round < 3; round++) {
      const settled = await Promise.allSettled(Array.from({ length: 10 }, () => issueLink(db, { userId: account.id, purpose: 'sign_in' })))
      expect(settled.filter(s => s.status === 'rejected')).toEqual([])
      tokens.push(...settled.map(s => (s as PromiseFulfilledResult<string>).value))
    }
    const rows = await tokensOf(account.id)
    expect(rows.map(r => r.tokenHash).sort()).toEqual(tokens.map(hashToken).sort())
    expect(rows.filter(r => r.usedAt === null)).toHaveLength(1)
  })

  it('lets one of ten parallel uses of the same link sign in and refuses the other nine, with no server error', async () => {
    const account = await makeAccount({ role: 'racer' })
    const token = await issueLink(db, { userId: account.id, purpose: 'sign_in' })
    const results = await Promise.all(Array.from({ length: 10 }, () => attempt('link', { token }, freshAddress())))
    expect(results.filter(r => r.status >= 500)).toEqual([])
    expect(tally(results.map(r => r.code))).toEqual({ null: 1, link_invalid: 9 })
    const [row] = await db.select().from(schema.authTokens).where(eq(schema.authTokens.tokenHash, hashToken(token)))
    expect(row!.usedAt).not.toBeNull()
  })

  it('uses links while new ones are issued for the same account (service): no call fails, and every link works at most once', async () => {
    const account = await makeAccount({ role: 'racer', verified: false })
    // One after another: a new link of a kind ends the earlier one, so only the last sign_in (4) and verify_email (3) links work.
    const ready: string[] = []
    for (let i = 0; i < 5; i++) ready.push(await issueLink(db, { userId: account.id, purpose: i % 2 ? 'verify_email' : 'sign_in' }))
    const settled = await Promise.allSettled([
      ...ready.map(token => consumeLink(db, token)),
      ...ready.map(token => consumeLink(db, token)),
      ...Array.from({ length: 5 }, () => issueLink(db, { userId: account.id, purpose: 'change_email', newEmail: uniqueEmail('moved') })),
    ])
    expect(settled.filter(s => s.status === 'rejected')).toEqual([])
    const outcomes = settled.slice(0, 10).map(s => (s as PromiseFulfilledResult<Awaited<ReturnType<typeof consumeLink>>>).value)
    // Each token was sent twice: at most one of the two uses signs in.
    for (let i = 0; i < ready.length; i++) expect([outcomes[i]!.ok, outcomes[i + ready.length]!.ok].filter(Boolean).length).toBeLessThanOrEqual(1)
    const okCount = outcomes.filter(o => o.ok).length
    const rows = await db.select().from(schema.authTokens).where(eq(schema.authTokens.userId, account.id))
    const hashes = ready.map(hashToken)
    // The two working links sign in once each; the change_email links issued meanwhile end only each other.
    expect(okCount).toBe(2)
    expect(rows.filter(r => r.purpose === 'change_email')).toHaveLength(5)
    expect(rows.filter(r => r.purpose === 'change_email' && r.usedAt === null)).toHaveLength(1)
    expect(rows.filter(r => hashes.includes(r.tokenHash) && r.usedAt === null)).toHaveLength(0)
    const [user] = await db.select().from(schema.users).where(eq(schema.users.id, account.id))
    expect(user!.emailVerifiedAt).not.toBeNull()
  })
})

describe('wrong passwords that create many rate-limit buckets at once', () => {
  it('answers twenty parallel wrong passwords for fresh accounts and addresses with the plain refusal, never a 500', async () => {
    const accounts = await Promise.all(Array.from({ length: 20 }, () => makeAccount({ role: 'racer' })))
    const results = await Promise.all(accounts.map(a => attempt('password', { email: a.email, password: 'not the password' }, freshAddress())))
    expect(results.filter(r => r.status >= 500)).toEqual([])
    // Fresh buckets all hold tokens: every attempt is checked and refused as a wrong password.
    expect(tally(results.map(r => r.code))).toEqual({ invalid: 20 })
    const keys = accounts.map(a => bucketKey.signInAccount(a.email))
    const buckets = await db.select().from(schema.rateLimitBuckets).where(inArray(schema.rateLimitBuckets.key, keys))
    // Each account's bucket was made full (50, POLICIES.signInAccount) and took exactly one token at that moment.
    expect(buckets).toHaveLength(20)
    expect(buckets.map(b => b.tokens)).toEqual(Array.from({ length: 20 }, () => POLICIES.signInAccount.capacity - 1))
  })

  it('counts twenty-five parallel wrong passwords from one address exactly: twenty refused as wrong, five as too many', async () => {
    const address = freshAddress()
    const results = await Promise.all(Array.from({ length: 25 }, () => attempt('password', { email: uniqueEmail('nobody'), password: 'not the password' }, address)))
    expect(results.filter(r => r.status >= 500)).toEqual([])
    // One address may try 20 wrong passwords (POLICIES.signInAddress); the rest wait for a refill.
    expect(tally(results.map(r => r.code))).toEqual({ invalid: POLICIES.signInAddress.capacity, rate_limited: 25 - POLICIES.signInAddress.capacity })
  })

  it('takes tokens from twenty sets of new buckets at once (service) without a lock conflict reaching the caller', async () => {
    // Twenty new addresses and accounts first (each its own keys), then twenty sharing one new address.
    const spread = await Promise.allSettled(Array.from({ length: 20 }, () => takeTokens(db as never, signInBuckets(uniqueEmail('spread'), freshAddress()))))
    expect(spread.filter(s => s.status === 'rejected')).toEqual([])
    // Twenty for one new account from twenty new addresses: all of them make the same account bucket.
    const email = uniqueEmail('one')
    const together = await Promise.allSettled(Array.from({ length: 20 }, () => takeTokens(db as never, signInBuckets(email, freshAddress()))))
    expect(together.filter(s => s.status === 'rejected')).toEqual([])
    const [account] = await db.select().from(schema.rateLimitBuckets).where(eq(schema.rateLimitBuckets.key, bucketKey.signInAccount(email)))
    expect(Math.round(account!.tokens)).toBe(POLICIES.signInAccount.capacity - 20)
    const address = freshAddress()
    const sets = Array.from({ length: 20 }, () => signInBuckets(uniqueEmail('burst'), address))
    const settled = await Promise.allSettled(sets.map(buckets => takeTokens(db as never, buckets)))
    expect(settled.filter(s => s.status === 'rejected')).toEqual([])
    expect(settled.every(s => s.status === 'fulfilled' && s.value.allowed)).toBe(true)
    const [shared] = await db.select().from(schema.rateLimitBuckets).where(eq(schema.rateLimitBuckets.key, bucketKey.signInAddress(address)))
    // The shared address bucket lost one token per call: 20 of its 20, less what dripped back (one per 30 s).
    expect(shared!.tokens).toBeLessThan(1)
    const created = await db.select().from(schema.rateLimitBuckets).where(like(schema.rateLimitBuckets.key, `sign-in:pair:burst-%|${address}`))
    expect(created).toHaveLength(20)
    // Each pair bucket was made full (5, POLICIES.signInPair) and gave one token, at the moment it was made.
    expect(created.map(b => b.tokens)).toEqual(Array.from({ length: 20 }, () => POLICIES.signInPair.capacity - 1))
  })
})
