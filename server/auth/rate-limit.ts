import { asc, eq, inArray, lt } from 'drizzle-orm'
import type { MySql2Database } from 'drizzle-orm/mysql2'
import * as schema from '../database/schema'
import { retryOnLockConflict } from '../utils/transaction'

/**
 * Token buckets: a bucket holds up to `capacity` attempts and regains one every `refillMs`.
 * An attempt takes one token; a successful sign-in gives it back, so only failures add up.
 * The arithmetic is pure (unit-tested); the buckets themselves are rows in MariaDB so every app
 * instance and a restarted server see the same counts.
 */
export interface BucketPolicy {
  capacity: number
  refillMs: number
}

export interface BucketState {
  tokens: number
  updatedAt: number
}

/** The limits in force. Values are our own choice, in line with common practice for sign-in throttling. */
export const POLICIES = {
  /** Wrong passwords for one e-mail address from one client address: 5 in a row, then one more every 3 minutes. */
  signInPair: { capacity: 5, refillMs: 3 * 60_000 },
  /** Wrong passwords from one client address, whatever the e-mail: 20, then one every 30 s. */
  signInAddress: { capacity: 20, refillMs: 30_000 },
  /**
   * Wrong passwords for one e-mail address from anywhere: 50 an hour. Only an attacker spread over
   * many addresses reaches it; it then pauses password sign-in for the account (links still work).
   */
  signInAccount: { capacity: 50, refillMs: 72_000 },
  /** The notice that password sign-in is paused: one an hour per account at most. */
  signInPausedNotice: { capacity: 1, refillMs: 3_600_000 },
  /** E-mailed links asked for one address: 3, then one every 5 minutes. */
  linkAccount: { capacity: 3, refillMs: 5 * 60_000 },
  /** E-mailed links and sign-ups asked from one client address: 10, then one a minute. */
  linkAddress: { capacity: 10, refillMs: 60_000 },
} satisfies Record<string, BucketPolicy>

/** Tokens in the bucket at `now`: what was left plus what has dripped back since, never above capacity. */
export function tokensAt(state: BucketState | undefined, policy: BucketPolicy, now: number): number {
  if (!state) return policy.capacity
  const elapsed = Math.max(0, now - state.updatedAt)
  return Math.min(policy.capacity, state.tokens + elapsed / policy.refillMs)
}

/** Takes one token if there is one; otherwise says how long until there will be. */
export function take(state: BucketState | undefined, policy: BucketPolicy, now: number): { allowed: boolean, next: BucketState, retryAfterMs: number } {
  const tokens = tokensAt(state, policy, now)
  if (tokens >= 1) return { allowed: true, next: { tokens: tokens - 1, updatedAt: now }, retryAfterMs: 0 }
  return { allowed: false, next: { tokens, updatedAt: now }, retryAfterMs: Math.ceil((1 - tokens) * policy.refillMs) }
}

/** Gives one token back (after a successful attempt), never above capacity. */
export function giveBack(state: BucketState | undefined, policy: BucketPolicy, now: number): BucketState {
  return { tokens: Math.min(policy.capacity, tokensAt(state, policy, now) + 1), updatedAt: now }
}

export interface BucketRequest {
  key: string
  policy: BucketPolicy
}

type Db = MySql2Database<typeof schema>
const { rateLimitBuckets } = schema

/** A sign-in burst can queue many attempts on one bucket: a few more runs than the default before a conflict is passed on. */
const RETRY = { attempts: 4 }

/**
 * Makes sure every bucket has its row, each new one full, before any transaction locks them. Each
 * row is its own statement, outside a transaction, in key order: a row lock on an existing key is
 * all the locking transactions below ever take, never a lock on the gap a new key goes into (two
 * inserts of new keys into each other's locked gaps would deadlock).
 */
async function ensureBuckets(db: Db, sorted: BucketRequest[], now: number): Promise<void> {
  const present = new Set((await db.select({ key: rateLimitBuckets.key }).from(rateLimitBuckets).where(inArray(rateLimitBuckets.key, sorted.map(r => r.key)))).map(r => r.key))
  for (const r of sorted) {
    if (present.has(r.key)) continue
    await retryOnLockConflict(() => db.insert(rateLimitBuckets).ignore().values({ key: r.key, tokens: r.policy.capacity, updatedAt: new Date(now) }))
  }
}

/** The requests in one order (by key) for every caller, so two transactions lock shared buckets in the same order. */
const byKey = (requests: BucketRequest[]) => [...new Map(requests.map(r => [r.key, r])).values()].sort((a, b) => (a.key < b.key ? -1 : a.key > b.key ? 1 : 0))

/**
 * Takes one token from every bucket, all or nothing, in one transaction with the rows locked
 * (keys in a fixed order, so two requests cannot deadlock; run again after a lock conflict, which is
 * safe: everything it does rolls back). A refusal changes no bucket and names the buckets that were empty.
 */
export async function takeTokens(db: Db, requests: BucketRequest[], now = Date.now()): Promise<{ allowed: boolean, retryAfterMs: number, refused: string[] }> {
  const sorted = byKey(requests)
  const keys = sorted.map(r => r.key)
  await ensureBuckets(db, sorted, now)
  return retryOnLockConflict(() => db.transaction(async (tx) => {
    const rows = await tx.select().from(rateLimitBuckets).where(inArray(rateLimitBuckets.key, keys)).orderBy(asc(rateLimitBuckets.key)).for('update')
    const states = new Map(rows.map(r => [r.key, { tokens: r.tokens, updatedAt: r.updatedAt.getTime() }]))
    const results = sorted.map(r => ({ r, result: take(states.get(r.key), r.policy, now) }))
    const refused = results.filter(x => !x.result.allowed)
    if (refused.length) return { allowed: false, retryAfterMs: Math.max(...refused.map(x => x.result.retryAfterMs)), refused: refused.map(x => x.r.key) }
    for (const { r, result } of results) {
      await tx.update(rateLimitBuckets).set({ tokens: result.next.tokens, updatedAt: new Date(now) }).where(eq(rateLimitBuckets.key, r.key))
    }
    return { allowed: true, retryAfterMs: 0, refused: [] }
  }), RETRY)
}

/** Gives back the token taken for an attempt that succeeded (a bucket pruned meanwhile is full already). */
export async function giveBackTokens(db: Db, requests: BucketRequest[], now = Date.now()): Promise<void> {
  const sorted = byKey(requests)
  await retryOnLockConflict(() => db.transaction(async (tx) => {
    const rows = await tx.select().from(rateLimitBuckets).where(inArray(rateLimitBuckets.key, sorted.map(r => r.key))).orderBy(asc(rateLimitBuckets.key)).for('update')
    const states = new Map(rows.map(r => [r.key, { tokens: r.tokens, updatedAt: r.updatedAt.getTime() }]))
    for (const r of sorted) {
      const state = states.get(r.key)
      if (!state) continue
      const next = giveBack(state, r.policy, now)
      await tx.update(rateLimitBuckets).set({ tokens: next.tokens, updatedAt: new Date(now) }).where(eq(rateLimitBuckets.key, r.key))
    }
  }), RETRY)
}

/** Drops buckets untouched for a day: by then every policy above has refilled them completely. */
export async function pruneBuckets(db: Db, now = Date.now()): Promise<void> {
  await db.delete(rateLimitBuckets).where(lt(rateLimitBuckets.updatedAt, new Date(now - 86_400_000)))
}

/** Bucket keys: per e-mail address, per client address, and per pair of the two, for each kind of attempt. */
export const bucketKey = {
  signInPair: (email: string, address: string) => `sign-in:pair:${email.toLowerCase()}|${address}`,
  signInAccount: (email: string) => `sign-in:account:${email.toLowerCase()}`,
  signInAddress: (address: string) => `sign-in:address:${address}`,
  signInPausedNotice: (email: string) => `notice:sign-in-paused:${email.toLowerCase()}`,
  linkAccount: (email: string) => `link:account:${email.toLowerCase()}`,
  linkAddress: (address: string) => `link:address:${address}`,
}

/**
 * The three buckets a password attempt takes from. Wrong guesses from one address exhaust that
 * address's pair first, so they never stop the owner's right password from another address; only
 * guesses spread over many addresses reach the slower per-account bucket.
 */
export function signInBuckets(email: string, address: string): BucketRequest[] {
  return [
    { key: bucketKey.signInPair(email, address), policy: POLICIES.signInPair },
    { key: bucketKey.signInAddress(address), policy: POLICIES.signInAddress },
    { key: bucketKey.signInAccount(email), policy: POLICIES.signInAccount },
  ]
}
