import { createError } from 'h3'
import type { Role } from '../../shared/domain'
import type { UnitSystem } from '../../shared/schemas/auth'
import type { SessionUser } from '../../shared/types/auth'

/**
 * The decisions behind the route guards, kept pure so they are unit-tested without a server:
 * who counts as signed in, which role may do what, and who owns a row.
 */
export interface AccountRow {
  id: number
  name: string
  email: string
  role: Role
  unitPreference: UnitSystem
  emailVerifiedAt: Date | null
  suspendedAt: Date | null
  sessionVersion: number
}

/** How long a session cookie lives (Auth.js rolls it forward while it is used). */
export const SESSION_MAX_AGE_S = 14 * 24 * 3600

export const ROLE_LABELS: Record<Role, string> = { racer: 'racers', builder: 'shops', admin: 'admins' }

/** The session version a token carries; a token from before versions existed counts as version 0. */
export function tokenSessionVersion(claim: unknown): number {
  return typeof claim === 'number' && Number.isSafeInteger(claim) && claim >= 0 ? claim : 0
}

/** Whether a token issued at `claim` is still current for the account (a password change or a sign-out everywhere raises the account's version). */
export function sessionCurrent(row: Pick<AccountRow, 'sessionVersion'>, claim: unknown): boolean {
  return tokenSessionVersion(claim) === row.sessionVersion
}

/** The user a session stands for: 401 when the session names no account, a suspended one, or was revoked since it was issued. */
export function activeUser(row: AccountRow | undefined | null, sessionVersion: unknown): SessionUser {
  if (!row) throw createError({ status: 401, message: 'Sign in to continue.' })
  if (row.suspendedAt) throw createError({ status: 401, message: 'This account is suspended, so its sessions no longer work.' })
  if (!sessionCurrent(row, sessionVersion)) throw createError({ status: 401, message: 'This session was signed out (a password change or a sign-out elsewhere). Sign in again.' })
  return { id: row.id, name: row.name, email: row.email, role: row.role, units: row.unitPreference }
}

/** 403 unless the user has one of the roles. */
export function assertRole(user: SessionUser, roles: readonly Role[]): SessionUser {
  if (roles.includes(user.role)) return user
  const allowed = roles.map(r => ROLE_LABELS[r]).join(' and ')
  throw createError({ status: 403, message: `This is only for ${allowed}; you are signed in with a ${user.role} account.` })
}

/** 403 unless the user owns the (visible) row. */
export function assertOwner(user: SessionUser, ownerUserId: number, what: string): void {
  if (ownerUserId !== user.id) throw createError({ status: 403, message: `Only the account that owns this ${what} can change it.` })
}

/** Whether an account whose password (or link) checked out may be given a session. */
export function signInRefusal(row: AccountRow): 'suspended' | 'unverified' | null {
  if (row.suspendedAt) return 'suspended'
  if (!row.emailVerifiedAt) return 'unverified'
  return null
}

/** A password may be changed without the current one only when there is none yet, or right after an e-mailed-link sign-in (the inbox proved who this is). */
export const LINK_REAUTH_MS = 15 * 60_000
export function currentPasswordNeeded(hasPassword: boolean, session: { method?: string, authAt?: number }, now = Date.now()): boolean {
  if (!hasPassword) return false
  if (session.method === 'link' && typeof session.authAt === 'number' && now - session.authAt <= LINK_REAUTH_MS) return false
  return true
}
