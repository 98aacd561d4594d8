import { encode, getToken, type JWT } from '@auth/core/jwt'
import { verify } from '@node-rs/argon2'
import { eq } from 'drizzle-orm'
import type { H3Event } from 'h3'
import type { Role } from '#shared/domain'
import type { SessionUser } from '#shared/types/auth'
import { activeUser, assertOwner, assertRole, currentPasswordNeeded, SESSION_MAX_AGE_S, sessionCurrent, type AccountRow } from '../auth/policy'
import { giveBackTokens, signInBuckets, takeTokens } from '../auth/rate-limit'
import { shops, users, type Shop } from '../database/schema'

/** The full address of the sign-in routes (AUTH_ORIGIN), which also says whether cookies are https-only. */
export function authOrigin(event?: H3Event): URL {
  const configured = process.env.AUTH_ORIGIN
  if (configured) return new URL(configured)
  return new URL('/api/auth', event ? getRequestURL(event) : 'http://127.0.0.1:3000')
}

/** The site's own origin, for links in e-mails. */
export function siteOrigin(event?: H3Event): string {
  return useRuntimeConfig().public.siteUrl || authOrigin(event).origin
}

export function authSecret(): string {
  const secret = useRuntimeConfig().authSecret
  if (!secret) throw createError({ status: 503, message: 'Sign-in is not configured (set NUXT_AUTH_SECRET).' })
  return secret
}

/** The session cookie's name, as Auth.js picks it (https-only cookies get the __Secure- prefix). */
function sessionCookie(event: H3Event): { name: string, secure: boolean } {
  const secure = authOrigin(event).protocol === 'https:'
  return { name: `${secure ? '__Secure-' : ''}authjs.session-token`, secure }
}

/** The decoded session token of the request, or null (no cookie, tampered, or expired). */
export async function readSession(event: H3Event): Promise<JWT | null> {
  if (event.context.authToken !== undefined) return event.context.authToken as JWT | null
  const token = await getToken({ req: { headers: event.headers }, secret: authSecret(), secureCookie: sessionCookie(event).secure })
  event.context.authToken = token
  return token
}

/**
 * Gives the caller a fresh session cookie carrying the account's new session version, so their
 * own session outlives a revocation of all the others. Encoded as Auth.js encodes it (same salt,
 * lifetime and cookie attributes), so Auth.js reads and rolls it as its own.
 */
export async function renewSession(event: H3Event, sessionVersion: number): Promise<void> {
  const current = await readSession(event)
  if (!current) return
  await issueSession(event, current, { sv: sessionVersion })
}

/** Sets a fresh session cookie: the token's claims with `changes`, a new lifetime, encoded as Auth.js does. */
async function issueSession(event: H3Event, current: JWT, changes: Partial<JWT>): Promise<void> {
  const { exp: _exp, iat: _iat, jti: _jti, ...claims } = current
  const token: JWT = { ...claims, ...changes }
  const { name, secure } = sessionCookie(event)
  const value = await encode({ token, secret: authSecret(), salt: name, maxAge: SESSION_MAX_AGE_S })
  setCookie(event, name, value, { httpOnly: true, sameSite: 'lax', path: '/', secure, maxAge: SESSION_MAX_AGE_S })
  event.context.authToken = token
}

/** What the pages' session state holds: the shape of Auth.js's /session answer. */
export interface PageSession {
  user: SessionUser
  expires: string
}

/**
 * A page view re-issues its session cookie once the cookie is older than this, as Auth.js's
 * `session.updateAge` (default 24 hours) does for database sessions, instead of on every view.
 */
export const SESSION_ROLL_AFTER_S = 24 * 3600

/**
 * The session of a server-rendered page, read here instead of through an internal request to
 * Auth.js's /session route: the same checks as its jwt callback (the account is read afresh, so a
 * suspended account or a revoked session is signed out on its next page), without the route's
 * round trip, its housekeeping cookies and a new cookie on every view. A session cookie that no
 * longer stands for a session is removed, as Auth.js removes it.
 */
export async function pageSession(event: H3Event, now = Date.now()): Promise<PageSession | null> {
  const token = await readSession(event)
  const id = Number(token?.sub)
  const row = token && Number.isSafeInteger(id) && id > 0 ? await loadAccount(id) : undefined
  if (!token || !row || row.suspendedAt || !sessionCurrent(row, token.sv)) {
    if (getCookie(event, sessionCookie(event).name) !== undefined) endSession(event)
    return null
  }
  const user: SessionUser = { id: row.id, name: row.name, email: row.email, role: row.role, units: row.unitPreference }
  event.context.user = user
  const nowS = Math.floor(now / 1000)
  let expiresS = typeof token.exp === 'number' ? token.exp : nowS
  if (typeof token.iat !== 'number' || nowS - token.iat >= SESSION_ROLL_AFTER_S) {
    await issueSession(event, token, { name: row.name, email: row.email, role: row.role, units: row.unitPreference })
    expiresS = nowS + SESSION_MAX_AGE_S
  }
  return { user, expires: new Date(expiresS * 1000).toISOString() }
}

/** Removes the caller's session cookie (after a sign-out everywhere). */
export function endSession(event: H3Event): void {
  const { name, secure } = sessionCookie(event)
  deleteCookie(event, name, { httpOnly: true, sameSite: 'lax', path: '/', secure })
  event.context.authToken = null
}

/** The columns a guard needs, read fresh on every request so that a suspension or a role change takes effect at once. */
export async function loadAccount(id: number): Promise<AccountRow | undefined> {
  const [row] = await useDb().select({
    id: users.id, name: users.name, email: users.email, role: users.role, unitPreference: users.unitPreference,
    emailVerifiedAt: users.emailVerifiedAt, suspendedAt: users.suspendedAt, sessionVersion: users.sessionVersion,
  }).from(users).where(eq(users.id, id)).limit(1)
  return row
}

/** The signed-in user: 401 when anonymous, when the session is stale or revoked, or when the account is suspended. */
export async function requireUser(event: H3Event): Promise<SessionUser> {
  if (event.context.user) return event.context.user as SessionUser
  const token = await readSession(event)
  const id = Number(token?.sub)
  const user = activeUser(Number.isSafeInteger(id) && id > 0 ? await loadAccount(id) : undefined, token?.sv)
  event.context.user = user
  return user
}

/** The signed-in user with one of the roles: 401 when anonymous, 403 for another role. */
export async function requireRole(event: H3Event, ...roles: Role[]): Promise<SessionUser> {
  return assertRole(await requireUser(event), roles)
}

/** The signed-in shop and their shop: every route that acts for a shop starts here. */
export async function requireCallerShop(event: H3Event): Promise<{ user: SessionUser, shop: Shop }> {
  const user = await requireRole(event, 'builder')
  const [shop] = await useDb().select().from(shops).where(eq(shops.userId, user.id)).limit(1)
  if (!shop) throw createError({ status: 403, message: 'This builder account has no shop profile yet.' })
  return { user, shop }
}

/** A shop the caller owns, by slug: 404 when no shop has it, 403 when it is someone else's (shops are public, so it is visible). */
export async function requireOwnShop(event: H3Event, slug: string): Promise<{ user: SessionUser, shop: Shop }> {
  const user = await requireUser(event)
  const [shop] = await useDb().select().from(shops).where(eq(shops.slug, slug)).limit(1)
  if (!shop) throw createError({ status: 404, message: 'No shop has that address.' })
  assertOwner(user, shop.userId, 'shop')
  return { user, shop }
}

/**
 * The client's address for rate limits. Behind a load balancer (NUXT_TRUST_PROXY=1) it is the last
 * X-Forwarded-For entry, the one our proxy added; the entries before it are whatever the client sent.
 */
export function clientAddress(event: H3Event): string {
  if (useRuntimeConfig().trustProxy) {
    const forwarded = getRequestHeader(event, 'x-forwarded-for')?.split(',').map(s => s.trim()).filter(Boolean)
    if (forwarded?.length) return forwarded[forwarded.length - 1]!
  }
  return event.node.req.socket?.remoteAddress ?? 'unknown'
}

/**
 * Asks for the current password before a password or e-mail change, unless the account has none
 * or the session began with an e-mailed link minutes ago. Wrong guesses count against the same
 * limits as sign-in.
 */
export async function confirmCurrentPassword(event: H3Event, user: SessionUser, currentPassword: string | undefined): Promise<void> {
  const db = useDb()
  const [row] = await db.select({ passwordHash: users.passwordHash }).from(users).where(eq(users.id, user.id)).limit(1)
  const session = await readSession(event)
  if (!row?.passwordHash || !currentPasswordNeeded(true, { method: session?.method, authAt: session?.authAt })) return
  if (!currentPassword) throw fieldError('currentPassword', 'Enter your current password.')
  const buckets = signInBuckets(user.email, clientAddress(event))
  if (!(await takeTokens(db, buckets)).allowed) throw createError({ status: 429, message: 'Too many wrong passwords: wait a few minutes, or sign in with an e-mailed link.' })
  if (!(await verify(row.passwordHash, currentPassword))) throw fieldError('currentPassword', 'That is not your current password.')
  await giveBackTokens(db, buckets)
}
