import { describe, expect, it } from 'vitest'
import { activeUser, assertOwner, assertRole, currentPasswordNeeded, LINK_REAUTH_MS, signInRefusal, type AccountRow } from '../../../server/auth/policy'

const row = (over: Partial<AccountRow> = {}): AccountRow => ({
  id: 7, name: 'Ada Quill', email: 'ada@example.test', role: 'racer', unitPreference: 'metric', emailVerifiedAt: new Date(0), suspendedAt: null, ...over,
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
    expect(activeUser(row())).toEqual({ id: 7, name: 'Ada Quill', email: 'ada@example.test', role: 'racer', units: 'metric' })
  })

  it('answers 401 for no account and for a suspended one', () => {
    expect(statusOf(() => activeUser(undefined))).toBe(401)
    expect(statusOf(() => activeUser(null))).toBe(401)
    expect(statusOf(() => activeUser(row({ suspendedAt: new Date() })))).toBe(401)
  })
})

describe('assertRole (the heart of requireRole)', () => {
  it.each([
    ['racer', ['racer'], 'passed'],
    ['builder', ['racer'], 403],
    ['admin', ['builder'], 403],
    ['admin', ['builder', 'admin'], 'passed'],
  ] as const)('a %s against %j: %s', (role, roles, expected) => {
    expect(statusOf(() => assertRole(activeUser(row({ role })), roles))).toBe(expected)
  })

  it('says in words who the route is for', () => {
    expect(() => assertRole(activeUser(row({ role: 'racer' })), ['builder'])).toThrow('This is only for shops; you are signed in with a racer account.')
    expect(() => assertRole(activeUser(row({ role: 'racer' })), ['builder', 'admin'])).toThrow('only for shops and admins')
  })
})

describe('assertOwner', () => {
  it('passes the owner and answers 403 to anyone else', () => {
    const user = activeUser(row())
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
