import { describe, expect, it } from 'vitest'
import { bucketKey, giveBack, POLICIES, signInBuckets, take, tokensAt, type BucketPolicy, type BucketState } from '../../../server/auth/rate-limit'

const policy: BucketPolicy = { capacity: 5, refillMs: 60_000 }

/** Runs `n` attempts at the same instant and returns which were allowed. */
function burst(n: number, start: BucketState | undefined, now: number) {
  let state = start
  const allowed: boolean[] = []
  for (let i = 0; i < n; i++) {
    const r = take(state, policy, now)
    allowed.push(r.allowed)
    state = r.next
  }
  return { allowed, state }
}

describe('token bucket arithmetic', () => {
  it('starts full: a new key allows `capacity` attempts, then refuses', () => {
    const { allowed } = burst(7, undefined, 1_000)
    expect(allowed).toEqual([true, true, true, true, true, false, false])
  })

  it('a refusal changes nothing and says how long until the next token', () => {
    const { state } = burst(5, undefined, 0)
    const refused = take(state, policy, 15_000)
    expect(refused.allowed).toBe(false)
    expect(refused.next.tokens).toBeCloseTo(0.25, 10)
    expect(refused.retryAfterMs).toBe(45_000)
    expect(take(refused.next, policy, 60_000).allowed).toBe(true)
  })

  it('refills one token per refill period, never above capacity', () => {
    const { state } = burst(5, undefined, 0)
    expect(tokensAt(state, policy, 60_000)).toBeCloseTo(1, 10)
    expect(tokensAt(state, policy, 150_000)).toBeCloseTo(2.5, 10)
    expect(tokensAt(state, policy, 10 * 60_000)).toBe(5)
  })

  it('ignores a clock that steps backwards rather than granting or taking tokens', () => {
    const state = { tokens: 2, updatedAt: 100_000 }
    expect(tokensAt(state, policy, 50_000)).toBe(2)
  })

  it('gives a token back after a success, capped at capacity', () => {
    const { state } = burst(5, undefined, 0)
    expect(giveBack(state, policy, 0).tokens).toBe(1)
    expect(giveBack({ tokens: 5, updatedAt: 0 }, policy, 0).tokens).toBe(5)
  })

  it('so only failures add up: take-then-give-back any number of times never runs dry', () => {
    let state: BucketState | undefined
    for (let i = 0; i < 50; i++) {
      const r = take(state, policy, i)
      expect(r.allowed).toBe(true)
      state = giveBack(r.next, policy, i)
    }
    expect(state!.tokens).toBe(5)
  })
})

describe('the policies in force', () => {
  it('allow 5 wrong passwords per account and address pair, 20 per client address and 50 per account before refusing', () => {
    const count = (p: BucketPolicy) => {
      let state: BucketState | undefined
      let n = 0
      while (take(state, p, 0).allowed) {
        state = take(state, p, 0).next
        n++
      }
      return n
    }
    expect(count(POLICIES.signInPair)).toBe(5)
    expect(count(POLICIES.signInAddress)).toBe(20)
    expect(count(POLICIES.signInAccount)).toBe(50)
    expect(count(POLICIES.signInPausedNotice)).toBe(1)
    expect(count(POLICIES.linkAccount)).toBe(3)
    expect(count(POLICIES.linkAddress)).toBe(10)
  })

  it('refills the per-account bucket at 50 an hour, the pair at one per 3 minutes, and the notice once an hour', () => {
    expect(3_600_000 / POLICIES.signInAccount.refillMs).toBe(50)
    expect(POLICIES.signInPair.refillMs).toBe(3 * 60_000)
    expect(POLICIES.signInPausedNotice.refillMs).toBe(3_600_000)
  })

  it('a password attempt takes from the pair, the address and the account, each keyed apart', () => {
    const keys = signInBuckets('Ada@Example.test', '10.0.0.1').map(b => b.key)
    expect(keys).toEqual([bucketKey.signInPair('ada@example.test', '10.0.0.1'), bucketKey.signInAddress('10.0.0.1'), bucketKey.signInAccount('ada@example.test')])
    expect(new Set(keys).size).toBe(3)
    expect(bucketKey.signInPair('a@b.test', '10.0.0.1')).not.toBe(bucketKey.signInPair('a@b.test', '10.0.0.2'))
  })

  it('keys accounts case-insensitively and keeps kinds apart', () => {
    expect(bucketKey.signInAccount('Ada@Example.test')).toBe(bucketKey.signInAccount('ada@example.test'))
    expect(bucketKey.signInAccount('a@b.test')).not.toBe(bucketKey.linkAccount('a@b.test'))
    expect(bucketKey.signInAddress('10.0.0.1')).not.toBe(bucketKey.linkAddress('10.0.0.1'))
  })
})
