import { z } from 'zod'
import { ROLES } from '../domain'
import { UNIT_SYSTEMS } from '../units/systems'

/** Request shapes of sign-up, sign-in and the account page: the forms and the server validate with these same schemas. */

export { UNIT_SYSTEMS, type UnitSystem } from '../units/systems'

/** Passwords: at least 10 characters (NIST SP 800-63B asks for 8 or more; 10 is our own floor), at most 128 so hashing stays bounded. */
export const PASSWORD_MIN = 10
export const PASSWORD_MAX = 128

export const emailSchema = z.string({ error: 'Enter your e-mail address' })
  .trim()
  .toLowerCase()
  .min(1, 'Enter your e-mail address')
  .max(254, 'An e-mail address has at most 254 characters')
  .pipe(z.email({ error: 'Enter an e-mail address like name@example.com' }))

export const passwordSchema = z.string({ error: 'Enter a password' })
  .min(PASSWORD_MIN, `A password has at least ${PASSWORD_MIN} characters`)
  .max(PASSWORD_MAX, `A password has at most ${PASSWORD_MAX} characters`)

export const nameSchema = z.string({ error: 'Enter your name' })
  .trim()
  .min(2, 'Enter your name (at least 2 characters)')
  .max(120, 'A name has at most 120 characters')

export const shopNameSchema = z.string({ error: 'Enter the shop name' })
  .trim()
  .min(2, 'Enter the shop name (at least 2 characters)')
  .max(120, 'A shop name has at most 120 characters')
  .regex(/[a-z0-9]/i, 'A shop name needs at least one letter or digit')

export const regionSchema = z.string({ error: 'Enter the region the shop works in' })
  .trim()
  .min(2, 'Enter the region the shop works in')
  .max(80, 'A region has at most 80 characters')

const accountFields = {
  name: nameSchema,
  email: emailSchema,
  password: passwordSchema,
}

/** Sign-up: a racer, or a shop owner with the shop they run. Admins are never made by sign-up. */
export const signUpSchema = z.discriminatedUnion('role', [
  z.object({ role: z.literal('racer'), ...accountFields }),
  z.object({ role: z.literal('builder'), ...accountFields, shopName: shopNameSchema, region: regionSchema }),
], { error: 'Choose whether you race or run a shop' })
export type SignUpInput = z.infer<typeof signUpSchema>

export const passwordSignInSchema = z.object({
  email: emailSchema,
  // Any length is accepted here so that an old password still gets its plain "does not match" answer.
  password: z.string({ error: 'Enter your password' }).min(1, 'Enter your password').max(PASSWORD_MAX, 'That password is too long'),
})
export type PasswordSignInInput = z.infer<typeof passwordSignInSchema>

/** A path on this site to return to after sign-in: starts with one `/`, no scheme, host or backslash. */
export function isSafeNextPath(value: unknown): value is string {
  return typeof value === 'string' && value.length <= 500 && value.startsWith('/') && !value.startsWith('//')
    && !value.includes('\\') && ![...value].some(c => c.charCodeAt(0) < 32 || c.charCodeAt(0) === 127)
}

export const nextPathSchema = z.string({ error: 'next is a path on this site' }).refine(isSafeNextPath, 'next is a path on this site, such as /deals')

export const linkRequestSchema = z.object({ email: emailSchema, next: nextPathSchema.optional() })

export const linkTokenSchema = z.object({
  token: z.string({ error: 'The link is incomplete' }).regex(/^[A-Za-z0-9_-]{43}$/, 'The link is incomplete: open it again from the e-mail'),
})

/** The account page's name form: the name alone (the route itself takes profilePatchSchema). */
export const profileNameSchema = z.object({ name: nameSchema })

export const profilePatchSchema = z.object({
  name: nameSchema.optional(),
  unitPreference: z.enum(UNIT_SYSTEMS, { error: 'Units are imperial or metric' }).optional(),
}).refine(v => v.name !== undefined || v.unitPreference !== undefined, 'Change the name or the units')
export type ProfilePatch = z.infer<typeof profilePatchSchema>

export const passwordChangeSchema = z.object({
  currentPassword: z.string().max(PASSWORD_MAX, 'That password is too long').optional(),
  newPassword: passwordSchema,
})

/** Which sessions to end: every other one (the caller's stays), or all of them, the caller's too. */
export const SIGN_OUT_SCOPES = ['others', 'everywhere'] as const
export const signOutSchema = z.object({
  scope: z.enum(SIGN_OUT_SCOPES, { error: 'scope is others or everywhere' }),
}).strict()
export type SignOutInput = z.infer<typeof signOutSchema>

export const emailChangeSchema = z.object({
  email: emailSchema,
  currentPassword: z.string().max(PASSWORD_MAX, 'That password is too long').optional(),
})

export const shopPatchSchema = z.object({
  shopName: shopNameSchema.optional(),
  region: regionSchema.optional(),
  bio: z.string().trim().max(2000, 'A shop description has at most 2,000 characters').optional(),
}).refine(v => Object.values(v).some(x => x !== undefined), 'Change at least one field of the shop')

export const adminUserQuery = z.object({
  q: z.string().trim().max(120, 'Search with at most 120 characters').optional(),
  role: z.enum(ROLES, { error: 'role is racer, builder or admin' }).optional(),
  page: z.coerce.number().int('page is a whole number').min(1, 'page starts at 1').max(10_000).default(1),
  perPage: z.coerce.number().int('perPage is a whole number').min(1, 'perPage is at least 1').max(100, 'perPage is at most 100').default(50),
})

export const adminUserPatchSchema = z.object({
  suspended: z.boolean({ error: 'suspended is true or false' }).optional(),
  role: z.literal('admin', { error: 'An account can only be raised to admin here' }).optional(),
}).refine(v => (v.suspended !== undefined) !== (v.role !== undefined), 'Make one change at a time: suspend, restore or make admin')

/** Maps zod issues to one message per top-level field, for showing beside form inputs. */
export function fieldErrors(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {}
  for (const issue of error.issues) {
    const key = issue.path.length ? String(issue.path[0]) : '_form'
    out[key] ??= issue.message
  }
  return out
}
