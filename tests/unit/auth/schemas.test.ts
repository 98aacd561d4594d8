import { describe, expect, it } from 'vitest'
import { adminUserPatchSchema, fieldErrors, linkTokenSchema, passwordSignInSchema, profilePatchSchema, signOutSchema, signUpSchema } from '../../../shared/schemas/auth'

// The same schemas run in the forms and in the routes; these pin what each accepts and says.
describe('signUpSchema', () => {
  it('accepts a racer, trims the name and lower-cases the e-mail', () => {
    const r = signUpSchema.parse({ role: 'racer', name: '  Ada Quill ', email: ' Ada@Example.TEST ', password: 'ten chars!' })
    expect(r).toEqual({ role: 'racer', name: 'Ada Quill', email: 'ada@example.test', password: 'ten chars!' })
  })

  it('needs the shop name and region from a shop', () => {
    const r = signUpSchema.safeParse({ role: 'builder', name: 'Ada Quill', email: 'ada@example.test', password: 'ten chars!' })
    expect(r.success).toBe(false)
    expect(Object.keys(fieldErrors(r.error!)).sort()).toEqual(['region', 'shopName'])
  })

  it('never makes an admin', () => {
    const r = signUpSchema.safeParse({ role: 'admin', name: 'Ada Quill', email: 'ada@example.test', password: 'ten chars!' })
    expect(r.success).toBe(false)
    expect(fieldErrors(r.error!)).toEqual({ role: 'Choose whether you race or run a shop' })
  })

  it.each([
    ['email', 'ada@', 'Enter an e-mail address like name@example.com'],
    ['password', 'nine char', 'A password has at least 10 characters'],
    ['password', 'x'.repeat(129), 'A password has at most 128 characters'],
    ['name', ' a ', 'Enter your name (at least 2 characters)'],
  ])('says what is wrong with %s %j', (field, value, message) => {
    const r = signUpSchema.safeParse({ role: 'racer', name: 'Ada Quill', email: 'ada@example.test', password: 'ten chars!', [field]: value })
    expect(fieldErrors(r.error!)[field]).toBe(message)
  })
})

describe('the other request shapes', () => {
  it('sign-in takes any password length up to the cap, so old passwords get the plain refusal', () => {
    expect(passwordSignInSchema.safeParse({ email: 'a@b.test', password: 'x' }).success).toBe(true)
    expect(passwordSignInSchema.safeParse({ email: 'a@b.test', password: '' }).success).toBe(false)
  })

  it('a link token is 43 base64url characters (32 random bytes)', () => {
    expect(linkTokenSchema.safeParse({ token: 'A'.repeat(43) }).success).toBe(true)
    expect(linkTokenSchema.safeParse({ token: 'A'.repeat(42) }).success).toBe(false)
    expect(linkTokenSchema.safeParse({ token: `${'A'.repeat(42)}=` }).success).toBe(false)
  })

  it('a profile change names something to change, and units are imperial or metric', () => {
    expect(profilePatchSchema.safeParse({}).success).toBe(false)
    expect(profilePatchSchema.safeParse({ unitPreference: 'metric' }).success).toBe(true)
    expect(profilePatchSchema.safeParse({ unitPreference: 'cubits' }).success).toBe(false)
  })

  it('a sign-out of sessions names its scope, others or everywhere, and nothing else', () => {
    expect(signOutSchema.safeParse({ scope: 'others' }).success).toBe(true)
    expect(signOutSchema.safeParse({ scope: 'everywhere' }).success).toBe(true)
    expect(signOutSchema.safeParse({}).success).toBe(false)
    expect(signOutSchema.safeParse({ scope: 'all' }).success).toBe(false)
    expect(signOutSchema.safeParse({ scope: 'others', userId: 1 }).success).toBe(false)
  })

  it('an admin makes one change at a time and can only raise to admin', () => {
    expect(adminUserPatchSchema.safeParse({ suspended: true }).success).toBe(true)
    expect(adminUserPatchSchema.safeParse({ role: 'admin' }).success).toBe(true)
    expect(adminUserPatchSchema.safeParse({ suspended: true, role: 'admin' }).success).toBe(false)
    expect(adminUserPatchSchema.safeParse({ role: 'builder' }).success).toBe(false)
    expect(adminUserPatchSchema.safeParse({}).success).toBe(false)
  })
})
