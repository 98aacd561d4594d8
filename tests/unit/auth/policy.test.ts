import { describe, expect, it } from 'vitest'
import { activeUser, assertOwner, assertRole, currentPasswordNeeded, LINK_REAUTH_MS, sessionCurrent, signInRefusal, tokenSessionVersion, type AccountRow } from '../../../server/auth/policy'

const row = (over: Partial<AccountRow> = {}): AccountRow => ({
  id: 7, name: 'Ada Quill', email: 'ada@example.test', role: 'racer', unitPreference: 'metric', emailVerifiedAt: new Date(0), suspendedAt: null, sessionVersion: 0, ...over,
})

function statusOf(fn: () => unknown): number | 'passed' {
  try {
    fn()
    return 'passed'
  }
  catch (err) {
    return (err as { statusCode: number }).statusCode
  }
}

describe('activeUser (the heart of requireUser)', () => {
  it('turns a live account into the session user', () => {
    expect(activeUser(row(), 0)).toEqual({ id: 7, name: 'Ada Quill', email: 'ada@example.test', role: 'racer', units: 'metric' })
  })

  it('answers 401 for no account and for a suspended one', () => {
    expect(statusOf(() => activeUser(undefined, 0))).toBe(401)
    expect(statusOf(() => activeUser(null, 0))).toBe(401)
    expect(statusOf(() => activeUser(row({ suspendedAt: new Date() }), 0))).toBe(401)
  })
})

describe('session versions (revocation)', () => {
  it('accepts a token carrying the account\'s current version, and refuses an older or a newer one with 401', () => {
    expect(activeUser(row({ sessionVersion: 3 }), 3).id).toBe(7)
    expect(statusOf(() => activeUser(row({ sessionVersion: 3 }), 2))).toBe(401)
    expect(statusOf(() => activeUser(row({ sessionVersion: 3 }), 4))).toBe(401)
    expect(() => activeUser(row({ sessionVersion: 1 }), 0)).toThrow('This session was signed out')
  })

  it('reads a token without a version as version 0, so cookies issued before versions existed last until the first revocation', () => {
    expect(tokenSessionVersion(undefined)).toBe(0)
    expect(sessionCurrent(row({ sessionVersion: 0 }), undefined)).toBe(true)
    expect(sessionCurrent(row({ sessionVersion: 1 }), undefined)).toBe(false)
  })

  it('never takes a malformed claim for a current version', () => {
    for (const claim of ['1', 1.5, -1, null, {}]) expect(sessionCurrent(row({ sessionVersion: 1 }), claim)).toBe(false)
  })

  it('reports a suspension before a revocation', () => {
    expect(() => activeUser(row({ suspendedAt: new Date(), sessionVersion: 2 }), 1)).toThrow('suspended')
  })
})

describe('assertRole (the heart of requireRole)', () => {
  it.each([
    ['racer', ['racer'], 'passed'],
    ['builder', ['racer'], 403],
    ['admin', ['builder'], 403],
    ['admin', ['builder', 'admin'], 'passed'],
  ] as const)('a %s against %j: %s', (role, roles, expected) => {
    expect(statusOf(() => assertRole(activeUser(row({ role }), 0), roles))).toBe(expected)
  })

  it('says in words who the route is for', () => {
    expect(() => assertRole(activeUser(row({ role: 'racer' }), 0), ['builder'])).toThrow('This is only for shops; you are signed in with a racer account.')
    expect(() => assertRole(activeUser(row({ role: 'racer' }), 0), ['builder', 'admin'])).toThrow('only for shops and admins')
  })
})

describe('assertOwner', () => {
  it('passes the owner and answers 403 to anyone else', () => {
    const user = activeUser(row(), 0)
    expect(statusOf(() => assertOwner(user, 7, 'shop'))).toBe('passed')
    expect(statusOf(() => assertOwner(user, 8, 'shop'))).toBe(403)
  })
})

describe('signInRefusal', () => {
  it('refuses suspended accounts first, then unconfirmed e-mail', () => {
    expect(signInRefusal(row())).toBeNull()
    expect(signInRefusal(row({ emailVerifiedAt: null }))).toBe('unverified')
    expect(signInRefusal(row({ emailVerifiedAt: null, suspendedAt: new Date() }))).toBe('suspended')
  })
})

describe('currentPasswordNeeded', () => {
  const now = 10_000_000
  it('is not needed when there is no password yet', () => {
    expect(currentPasswordNeeded(false, {}, now)).toBe(false)
  })
  it('is not needed within 15 minutes of an e-mailed-link sign-in, and is after', () => {
    expect(currentPasswordNeeded(true, { method: 'link', authAt: now - LINK_REAUTH_MS }, now)).toBe(false)
    expect(currentPasswordNeeded(true, { method: 'link', authAt: now - LINK_REAUTH_MS - 1 }, now)).toBe(true)
  })
  it('is always needed after a password sign-in', () => {
    expect(currentPasswordNeeded(true, { method: 'password', authAt: now }, now)).toBe(true)
    expect(currentPasswordNeeded(true, {}, now)).toBe(true)
  })
})
