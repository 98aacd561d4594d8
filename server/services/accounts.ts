import { createHash, randomBytes } from 'node:crypto'
import { and, asc, count, eq, gt, inArray, isNull, like, lt, ne, or, sql, type SQL } from 'drizzle-orm'
import { createError } from 'h3'
import type { Role } from '../../shared/domain'
import type { SignUpInput, UnitSystem } from '../../shared/schemas/auth'
import { firstFreeSlug, slugify } from '../../shared/text/slug'
import type { AccountProfile, AdminUserRow } from '../../shared/types/auth'
import type { Page } from '../../shared/types/builds'
import { authTokens, shops, users, type User } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import { writeAudit } from './audit'

type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]

// Relative imports only: scripts/admin-create.ts runs this file outside Nitro.

export type LinkPurpose = 'verify_email' | 'sign_in' | 'change_email'

/** How long an e-mailed link works. */
export const LINK_TTL_MS: Record<LinkPurpose, number> = {
  verify_email: 24 * 3_600_000,
  sign_in: 20 * 60_000,
  change_email: 3_600_000,
}

/** MariaDB's duplicate-key error, for the unique indexes that settle races. */
export function isDuplicateKey(err: unknown, index?: string): boolean {
  const e = err as { cause?: { code?: string, sqlMessage?: string }, code?: string, sqlMessage?: string }
  const inner = e?.cause ?? e
  return inner?.code === 'ER_DUP_ENTRY' && (!index || (inner.sqlMessage ?? '').includes(index))
}

export const hashToken = (token: string): string => createHash('sha256').update(token).digest('hex')

export async function findUserByEmail(db: Database, email: string): Promise<User | undefined> {
  const [row] = await db.select().from(users).where(eq(users.email, email.toLowerCase())).limit(1)
  return row
}

export async function findUserById(db: Database, id: number): Promise<User | undefined> {
  const [row] = await db.select().from(users).where(eq(users.id, id)).limit(1)
  return row
}

/** A shop slug from the shop name that no other shop has yet (harrow-creek, harrow-creek-2, …). */
async function freeShopSlug(db: Pick<Database, 'select'>, shopName: string): Promise<string> {
  const base = slugify(shopName, 130) || 'shop'
  const rows = await db.select({ slug: shops.slug }).from(shops)
    .where(or(eq(shops.slug, base), like(shops.slug, `${base}-%`)))
  return firstFreeSlug(base, new Set(rows.map(r => r.slug)))
}

/**
 * Creates a racer, or a shop owner together with the shop, in one transaction.
 * `created: false` when the e-mail is already registered (the caller must not say so).
 */
export async function createAccount(db: Database, input: SignUpInput, passwordHash: string): Promise<{ created: true, userId: number } | { created: false }> {
  for (let attempt = 0; attempt < 3; attempt++) {
    try {
      // Safe to repeat: both rows roll back together. Concurrent sign-ups can meet on the unique indexes' gap locks.
      return await inRetriedTransaction(db, async (tx) => {
        const [row] = await tx.insert(users).values({ email: input.email, name: input.name, passwordHash, role: input.role }).$returningId()
        const userId = row!.id
        if (input.role === 'builder') {
          const slug = await freeShopSlug(tx, input.shopName)
          await tx.insert(shops).values({ userId, shopName: input.shopName, slug, region: input.region, bio: '', specialties: [], capabilities: [] })
        }
        return { created: true as const, userId }
      })
    }
    catch (err) {
      if (isDuplicateKey(err, 'users_email_unique')) return { created: false }
      // Another shop took the same slug between our read and our write: pick again.
      if (isDuplicateKey(err, 'builder_profiles_slug_unique')) continue
      throw err
    }
  }
  throw createError({ status: 409, message: 'Another shop with that name signed up at the same moment: try again.' })
}

/**
 * Locks a user row for the rest of the transaction. Taken before any auth_tokens row of the user is
 * read for update or written: the users row comes first in the lock order (user, then token), and a
 * token insert's foreign-key check would otherwise hold a shared lock on it that a later update of the
 * user cannot turn into its own.
 */
async function lockUser(tx: Tx, userId: number): Promise<User | undefined> {
  const [row] = await tx.select().from(users).where(eq(users.id, userId)).limit(1).for('update')
  return row
}

/**
 * Locks several user rows at once, lowest id first (one order for every transaction that takes more
 * than one), and returns them by id. An audit row's actor is among them: its foreign-key check would
 * otherwise take a shared lock on the actor's row after the target's, the reverse of another admin's
 * change to the first admin.
 */
async function lockUsers(tx: Tx, ids: number[]): Promise<Map<number, User>> {
  const sorted = [...new Set(ids)].sort((a, b) => a - b)
  const rows = await tx.select().from(users).where(inArray(users.id, sorted)).orderBy(asc(users.id)).for('update')
  return new Map(rows.map(r => [r.id, r]))
}

/**
 * Stores a new single-use link token (hashed) and returns the token itself for the e-mail. Earlier
 * unused links of the same kind stop working. Two links asked for at once for the same user take
 * turns on the user row (without it, each would lock a range of the user's tokens and then insert
 * into the other's range).
 */
export async function issueLink(db: Database, opts: { userId: number, purpose: LinkPurpose, newEmail?: string, ttlMs?: number }, now = new Date()): Promise<string> {
  const token = randomBytes(32).toString('base64url')
  // Safe to repeat: the token is drawn once, and every write rolls back with the transaction.
  await inRetriedTransaction(db, async (tx) => {
    if (!(await lockUser(tx, opts.userId))) throw createError({ status: 404, message: 'No account has that id.' })
    await tx.update(authTokens).set({ usedAt: now })
      .where(and(eq(authTokens.userId, opts.userId), eq(authTokens.purpose, opts.purpose), isNull(authTokens.usedAt)))
    await tx.insert(authTokens).values({
      userId: opts.userId,
      purpose: opts.purpose,
      tokenHash: hashToken(token),
      newEmail: opts.newEmail ?? null,
      expiresAt: new Date(now.getTime() + (opts.ttlMs ?? LINK_TTL_MS[opts.purpose])),
    })
  })
  return token
}

export type LinkOutcome
  = | { ok: true, user: User, purpose: LinkPurpose, previousEmail?: string }
    | { ok: false, reason: 'invalid' | 'suspended' | 'email_taken' }

/**
 * Uses a link token once: unknown, used or expired tokens are refused. Using any link proves the
 * inbox, so it also confirms the e-mail address; an e-mail-change link moves the account to the new address.
 */
export async function consumeLink(db: Database, token: string, now = new Date()): Promise<LinkOutcome> {
  const tokenHash = hashToken(token)
  try {
    // Safe to repeat: nothing outside the database happens inside.
    return await inRetriedTransaction(db, async (tx): Promise<LinkOutcome> => {
      // Which user the token belongs to, read without a lock: the user row is locked before the token (user, then token).
      const [peek] = await tx.select({ userId: authTokens.userId }).from(authTokens).where(eq(authTokens.tokenHash, tokenHash)).limit(1)
      if (!peek) return { ok: false, reason: 'invalid' }
      const user = await lockUser(tx, peek.userId)
      const [link] = await tx.select().from(authTokens)
        .where(and(eq(authTokens.tokenHash, tokenHash), isNull(authTokens.usedAt), gt(authTokens.expiresAt, now)))
        .limit(1).for('update')
      if (!link || !user || link.userId !== user.id) return { ok: false, reason: 'invalid' }
      await tx.update(authTokens).set({ usedAt: now }).where(eq(authTokens.id, link.id))
      if (user.suspendedAt) return { ok: false, reason: 'suspended' }
      const patch: Partial<User> = {}
      if (!user.emailVerifiedAt) patch.emailVerifiedAt = now
      let previousEmail: string | undefined
      if (link.purpose === 'change_email' && link.newEmail) {
        const [taken] = await tx.select({ id: users.id }).from(users).where(and(eq(users.email, link.newEmail), ne(users.id, user.id)))
        if (taken) return { ok: false, reason: 'email_taken' }
        previousEmail = user.email
        patch.email = link.newEmail
        patch.emailVerifiedAt = now
      }
      if (Object.keys(patch).length) await tx.update(users).set(patch).where(eq(users.id, user.id))
      return { ok: true, user: { ...user, ...patch }, purpose: link.purpose, previousEmail }
    })
  }
  catch (err) {
    if (isDuplicateKey(err, 'users_email_unique')) return { ok: false, reason: 'email_taken' }
    throw err
  }
}

/** The account page's view of a user, with the shop when the user runs one. */
export async function getProfile(db: Database, userId: number): Promise<AccountProfile | null> {
  const [row] = await db.select({ user: users, shop: shops }).from(users)
    .leftJoin(shops, eq(shops.userId, users.id))
    .where(eq(users.id, userId)).limit(1)
  if (!row) return null
  const { user, shop } = row
  return {
    id: user.id,
    name: user.name,
    email: user.email,
    role: user.role,
    units: user.unitPreference,
    emailVerified: user.emailVerifiedAt !== null,
    hasPassword: user.passwordHash !== null,
    createdAt: user.createdAt.toISOString(),
    shop: shop ? { slug: shop.slug, shopName: shop.shopName, region: shop.region, bio: shop.bio } : null,
  }
}

export async function updateProfile(db: Database, userId: number, patch: { name?: string, unitPreference?: UnitSystem }): Promise<void> {
  await db.update(users).set(patch).where(eq(users.id, userId))
}

/** The next session version of a row about to be written: every session cookie issued before stops working. */
const nextSessionVersion = sql`${users.sessionVersion} + 1`

async function sessionVersionOf(db: Pick<Database, 'select'>, userId: number): Promise<number> {
  const [row] = await db.select({ v: users.sessionVersion }).from(users).where(eq(users.id, userId)).limit(1)
  if (!row) throw createError({ status: 401, message: 'Sign in to continue.' })
  return row.v
}

/** Sets a new password and ends every session of the account; returns the new session version (for the caller's fresh cookie). */
export async function setPasswordHash(db: Database, userId: number, passwordHash: string): Promise<number> {
  return inRetriedTransaction(db, async (tx) => {
    await tx.update(users).set({ passwordHash, sessionVersion: nextSessionVersion }).where(eq(users.id, userId))
    return sessionVersionOf(tx, userId)
  })
}

/** Ends every session of the account (sign out everywhere, or all but the caller's once it is renewed); returns the new session version. */
export async function revokeSessions(db: Database, userId: number): Promise<number> {
  return inRetriedTransaction(db, async (tx) => {
    await tx.update(users).set({ sessionVersion: nextSessionVersion }).where(eq(users.id, userId))
    return sessionVersionOf(tx, userId)
  })
}

function toAdminRow({ user, shop }: { user: User, shop: { slug: string | null, shopName: string | null } | null }): AdminUserRow {
  return {
    id: user.id,
    name: user.name,
    email: user.email,
    role: user.role,
    emailVerified: user.emailVerifiedAt !== null,
    suspended: user.suspendedAt !== null,
    createdAt: user.createdAt.toISOString(),
    shop: shop?.slug && shop.shopName ? { slug: shop.slug, shopName: shop.shopName } : null,
  }
}

const adminColumns = { user: users, shop: { slug: shops.slug, shopName: shops.shopName } }

/** Accounts for the admin list, by e-mail, optionally filtered by role and a piece of the name or e-mail. */
export async function listUsers(db: Database, query: { q?: string, role?: Role, page: number, perPage: number }): Promise<Page<AdminUserRow>> {
  const filters: SQL[] = []
  if (query.role) filters.push(eq(users.role, query.role))
  if (query.q) {
    const pattern = `%${query.q.replace(/[\\%_]/g, c => `\\${c}`)}%`
    filters.push(or(like(users.email, pattern), like(users.name, pattern))!)
  }
  const where = filters.length ? and(...filters) : undefined
  const [rows, totals] = await Promise.all([
    db.select(adminColumns).from(users)
      .leftJoin(shops, eq(shops.userId, users.id))
      .where(where)
      .orderBy(asc(users.email))
      .limit(query.perPage).offset((query.page - 1) * query.perPage),
    db.select({ n: count() }).from(users).where(where),
  ])
  return { total: totals[0]?.n ?? 0, page: query.page, perPage: query.perPage, items: rows.map(toAdminRow) }
}

/** One account as the admin list shows it, or null. */
export async function getAdminUserRow(db: Database, id: number): Promise<AdminUserRow | null> {
  const [row] = await db.select(adminColumns).from(users).leftJoin(shops, eq(shops.userId, users.id)).where(eq(users.id, id)).limit(1)
  return row ? toAdminRow(row) : null
}

/** Suspends or restores an account, with an audit row, ending its sessions either way. An admin cannot suspend their own account. */
export async function setSuspended(db: Database, actorId: number, userId: number, suspended: boolean): Promise<void> {
  if (actorId === userId && suspended) throw createError({ status: 409, message: 'You cannot suspend your own account; ask another admin.' })
  await inRetriedTransaction(db, async (tx) => {
    const user = (await lockUsers(tx, [actorId, userId])).get(userId)
    if (!user) throw createError({ status: 404, message: 'No account has that id.' })
    if ((user.suspendedAt !== null) === suspended) return
    const suspendedAt = suspended ? new Date() : null
    // Both ways end every session: one from before a suspension must not come back with the restore.
    await tx.update(users).set({ suspendedAt, sessionVersion: nextSessionVersion }).where(eq(users.id, userId))
    await writeAudit(tx, {
      actorId,
      action: suspended ? 'account.suspend' : 'account.restore',
      entityType: 'user',
      entityId: userId,
      before: { suspendedAt: user.suspendedAt?.toISOString() ?? null },
      after: { suspendedAt: suspendedAt?.toISOString() ?? null },
      note: user.email,
    })
  })
}

/**
 * Raises an account to admin, with an audit row (actor null: the command line). A shop keeps a
 * shop, and a user has one role, so a shop account is refused.
 */
export async function makeAdmin(db: Database, actorId: number | null, userId: number): Promise<'changed' | 'already'> {
  return inRetriedTransaction(db, async (tx) => {
    const user = (await lockUsers(tx, actorId === null ? [userId] : [actorId, userId])).get(userId)
    if (!user) throw createError({ status: 404, message: 'No account has that id.' })
    if (user.role === 'admin') return 'already' as const
    if (user.role === 'builder') throw createError({ status: 409, message: 'This account runs a shop; an admin needs an account of their own.' })
    await tx.update(users).set({ role: 'admin' }).where(eq(users.id, userId))
    await writeAudit(tx, { actorId, action: 'account.make_admin', entityType: 'user', entityId: userId, before: { role: user.role }, after: { role: 'admin' }, note: user.email })
    return 'changed' as const
  })
}

/** Creates an admin account with no password (the first sign-in is by an e-mailed link), with an audit row. */
export async function createAdmin(db: Database, email: string, name: string): Promise<number> {
  return inRetriedTransaction(db, async (tx) => {
    const [row] = await tx.insert(users).values({ email: email.toLowerCase(), name, role: 'admin', passwordHash: null }).$returningId()
    await writeAudit(tx, { actorId: null, action: 'account.create_admin', entityType: 'user', entityId: row!.id, after: { email, role: 'admin' }, note: 'npm run admin:create' })
    return row!.id
  })
}

/** Drops link tokens a week past their expiry (used or not): they can never work again. */
export async function pruneLinks(db: Database, now = Date.now()): Promise<void> {
  await db.delete(authTokens).where(lt(authTokens.expiresAt, new Date(now - 7 * 86_400_000)))
}
