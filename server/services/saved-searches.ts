// Saved searches: a signed-in user keeps the filters of a search, sees how many builds match now,
// and is e-mailed (through the outbox) when a build that matches becomes a verified build.
import { createError } from 'h3'
import { and, asc, eq, isNull, lte, ne, notExists, sql } from 'drizzle-orm'
import { MAX_SAVED_SEARCHES, type SavedSearchCreate, type SavedSearchPatch } from '#shared/schemas/saved-search'
import { searchFilters, type SearchFilterParams } from '#shared/schemas/search'
import { canonicalFilters, searchPath } from '#shared/search/saved'
import type { SavedSearchList, SavedSearchView } from '#shared/types/saved-search'
import type { SearchIndex } from '../../search/index'
import { shops, builds, savedSearchAnnouncements, savedSearches, users, type SavedSearch } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import { renderSavedSearchMail } from './mail-templates'
import { enqueueRendered } from './outbox'

/** Where the account page lists the saved searches (the e-mails link here). */
export const MANAGE_PATH = '/account#saved-searches'

/** The stored filters, checked again by the search schema; null when they no longer pass it (the schema moved on). */
function storedFilters(row: Pick<SavedSearch, 'id' | 'query'>): SearchFilterParams | null {
  const parsed = searchFilters.safeParse(row.query)
  if (parsed.success) return parsed.data
  console.warn(`saved search ${row.id}: its stored filters no longer pass the search schema (${parsed.error.issues.map(i => i.message).join('; ')})`)
  return null
}

/** How many published builds the filters find in the index now. */
function matchCount(index: SearchIndex, filters: SearchFilterParams | null): number {
  return filters ? index.query({ ...filters, page: 1, perPage: 1 }).total : 0
}

function viewOf(index: SearchIndex, row: SavedSearch): SavedSearchView {
  const filters = storedFilters(row)
  return {
    id: row.id,
    name: row.name,
    query: filters ?? row.query,
    link: searchPath(filters ?? {}),
    emailOn: row.emailOn,
    matches: matchCount(index, filters),
    createdAt: row.createdAt.toISOString(),
    lastNotifiedAt: row.lastNotifiedAt?.toISOString() ?? null,
  }
}

/** The caller's saved search by id; 404 for one that is missing or someone else's (it is not theirs to know about). */
async function ownSearch(db: Database, userId: number, id: number): Promise<SavedSearch> {
  const [row] = await db.select().from(savedSearches).where(and(eq(savedSearches.id, id), eq(savedSearches.userId, userId))).limit(1)
  if (!row) throw createError({ status: 404, message: 'You have no saved search with that id.' })
  return row
}

/** The caller's saved searches, oldest first, each with how many builds match now. */
export async function listSavedSearches(db: Database, index: SearchIndex, userId: number): Promise<SavedSearchList> {
  const rows = await db.select().from(savedSearches).where(eq(savedSearches.userId, userId)).orderBy(asc(savedSearches.id))
  return { searches: rows.map(r => viewOf(index, r)), max: MAX_SAVED_SEARCHES }
}

/**
 * Saves a search. The account's row is locked first so two saves at once cannot pass the cap
 * together; the cap and an identical saved search answer 409, and nothing is written.
 */
export async function createSavedSearch(db: Database, index: SearchIndex, userId: number, input: SavedSearchCreate): Promise<SavedSearchView> {
  const query = canonicalFilters(input.query)
  const id = await inRetriedTransaction(db, async (tx) => {
    await tx.select({ id: users.id }).from(users).where(eq(users.id, userId)).for('update')
    const mine = await tx.select({ name: savedSearches.name, query: savedSearches.query }).from(savedSearches).where(eq(savedSearches.userId, userId))
    if (mine.length >= MAX_SAVED_SEARCHES) {
      throw createError({ status: 409, message: `You already keep ${MAX_SAVED_SEARCHES} saved searches, the most one account can have. Delete one to save another.` })
    }
    const wanted = JSON.stringify(query)
    const same = mine.find(s => JSON.stringify(canonicalFilters(s.query)) === wanted)
    if (same) throw createError({ status: 409, message: `You already saved this search as "${same.name}".` })
    const [row] = await tx.insert(savedSearches).values({ userId, name: input.name, query, createdAt: new Date() }).$returningId()
    return row!.id
  })
  return viewOf(index, await ownSearch(db, userId, id))
}

/** Renames a saved search and/or switches its e-mail on or off. */
export async function updateSavedSearch(db: Database, index: SearchIndex, userId: number, id: number, patch: SavedSearchPatch): Promise<SavedSearchView> {
  await ownSearch(db, userId, id)
  const set: Partial<Pick<SavedSearch, 'name' | 'emailOn'>> = {}
  if (patch.name !== undefined) set.name = patch.name
  if (patch.emailOn !== undefined) set.emailOn = patch.emailOn
  await db.update(savedSearches).set(set).where(and(eq(savedSearches.id, id), eq(savedSearches.userId, userId)))
  return viewOf(index, await ownSearch(db, userId, id))
}

/** Deletes a saved search (its announcement rows go with it). */
export async function deleteSavedSearch(db: Database, userId: number, id: number): Promise<void> {
  await ownSearch(db, userId, id)
  await db.delete(savedSearches).where(and(eq(savedSearches.id, id), eq(savedSearches.userId, userId)))
}

export interface Announcement {
  /** Saved searches that took the build as new (one row each). */
  announced: number
  /** Of those, how many e-mails were queued. */
  mailed: number
}

/**
 * Announces a build to the saved searches it is new for. Runs after every committed change of a
 * build (the build-changed hook, once the index is in step) and does something only for a
 * published build with verified evidence. A build is new for a search saved before it became a
 * verified build (the later of its first verification and its first publish), whose filters it
 * matches in the live index — the same filters and words as the search page — and which has not
 * announced it yet. A shop's own builds are never announced to its owner, nor anything to a
 * suspended account. Each announcement is one row (unique per search and build) and, with the
 * e-mail on, one outbox mail in the same transaction, so the mail is sent and retried by the
 * drainer and a second verified pull on the same build announces nothing again.
 */
export async function announceBuild(db: Database, index: SearchIndex, buildId: number, siteUrl: string): Promise<Announcement> {
  const none = { announced: 0, mailed: 0 }
  const [row] = await db.select({
    status: builds.status, slug: builds.slug, title: builds.title, verifiedAt: builds.verifiedAt, publishedAt: builds.publishedAt,
    shopName: shops.shopName, shopOwnerId: shops.userId,
  }).from(builds).innerJoin(shops, eq(shops.id, builds.shopId)).where(eq(builds.id, buildId)).limit(1)
  if (!row || row.status !== 'published' || !row.verifiedAt) return none
  const entry = index.get(buildId)
  if (!entry?.verified) return none
  const since = new Date(Math.max(row.verifiedAt.getTime(), row.publishedAt?.getTime() ?? 0))

  const candidates = await db.select({ search: savedSearches, email: users.email, name: users.name }).from(savedSearches)
    .innerJoin(users, eq(users.id, savedSearches.userId))
    .where(and(
      lte(savedSearches.createdAt, since),
      ne(savedSearches.userId, row.shopOwnerId),
      isNull(users.suspendedAt),
      notExists(db.select({ one: sql`1` }).from(savedSearchAnnouncements)
        .where(and(eq(savedSearchAnnouncements.savedSearchId, savedSearches.id), eq(savedSearchAnnouncements.buildId, buildId)))),
    ))
  const matched = candidates.filter((c) => {
    const filters = storedFilters(c.search)
    return filters !== null && index.matches(buildId, filters)
  })
  if (!matched.length) return none

  const buildLink = `${siteUrl}/builds/${row.slug}`
  const manageLink = `${siteUrl}${MANAGE_PATH}`
  // Safe to run again after a lock conflict (the outbox drainer locks the same table's rows): every row
  // it writes is unique per search and build, and all of them roll back together.
  return inRetriedTransaction(db, async (tx) => {
    const result = { announced: 0, mailed: 0 }
    const now = new Date()
    for (const { search, email, name } of matched) {
      // IGNORE: another server instance announced it first, or the search was deleted meanwhile.
      const [inserted] = await tx.insert(savedSearchAnnouncements).ignore().values({ savedSearchId: search.id, buildId, mailed: search.emailOn })
      if (inserted.affectedRows !== 1) continue
      result.announced++
      if (!search.emailOn) continue
      const mail = renderSavedSearchMail({
        recipientName: name, searchName: search.name, buildTitle: row.title, shopName: row.shopName,
        displacementCi: Math.round(entry.displacementCi * 10) / 10, peakHp: entry.peakHp, peakHpRpm: entry.peakHpRpm, buildLink, manageLink,
      })
      await enqueueRendered(tx, email, mail, `saved-search:${search.id}:build:${buildId}`)
      await tx.update(savedSearches).set({ lastNotifiedAt: now }).where(eq(savedSearches.id, search.id))
      result.mailed++
    }
    return result
  }, { attempts: 3 })
}
