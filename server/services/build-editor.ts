import { randomBytes } from 'node:crypto'
import { createError } from 'h3'
import { and, asc, count, eq, inArray, like, ne } from 'drizzle-orm'
import { MAX_PARTS, publishProblems, REQUIRED_FOR_PUBLISH, type BuildPatch } from '#shared/schemas/build'
import type { EditorBuild, EditorFields, PublishIssue } from '#shared/types/editor'
import { firstFreeSlug, slugify } from '#shared/text/slug'
import { buildParts, buildPhotos, builds, dynoPulls, type Build } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import { refreshHeadline } from './headline'
import { afterBuildChanged } from './build-events'
import { recordBuildChange } from './search-feed'
import type { ReadStoredText } from './curves'
import { recheckSubmittedPulls } from './evidence-uploads'
import { deleteFileRows, discard, type Tx, type UploadStore } from './build-files'
import { ownBuild, type ShopRef } from './own-build'

/** The combination fields the evidence checks read: a change to any of them makes a report, and a verification, stale. */
const CHECKED_COMBINATION_FIELDS = ['aspiration', 'boreIn', 'strokeIn', 'cylinders'] as const
const COMBINATION_FIELD_WORDS: Record<(typeof CHECKED_COMBINATION_FIELDS)[number], string> = { aspiration: 'aspiration', boreIn: 'bore', strokeIn: 'stroke', cylinders: 'cylinder count' }

const EDITABLE_COLUMNS = ['title', ...REQUIRED_FOR_PUBLISH, 'injectorSizeLbHr', 'injectorCount'] as const satisfies (keyof EditorFields)[]

/** A build's address from its title: the shared slug rules with `&` dropped, or `build` when no word is left. */
export function buildSlug(title: string): string {
  return slugify(title, 120, { ampersand: 'drop' }) || 'build'
}

const draftSlug = () => `draft-${randomBytes(6).toString('hex')}`

/** The publish check over a stored row: the same zod schema the editor page runs. */
export function publishIssues(build: Build, livePulls: number): PublishIssue[] {
  return publishProblems(fieldsOf(build) as unknown as Record<string, unknown>, livePulls)
}

function fieldsOf(build: Build): EditorFields {
  return Object.fromEntries(EDITABLE_COLUMNS.map(k => [k, build[k]])) as unknown as EditorFields
}

/** Counts the pulls that a build can show (submitted or verified). */
async function livePullCount(db: Database | Tx, buildId: number): Promise<number> {
  const [row] = await db.select({ n: count() }).from(dynoPulls).where(and(eq(dynoPulls.buildId, buildId), inArray(dynoPulls.status, ['submitted', 'verified'])))
  return row?.n ?? 0
}

/** A new draft with only its title. Returns its id. */
export async function createDraft(db: Database, shop: ShopRef, title: string): Promise<number> {
  const [row] = await db.insert(builds).values({ shopId: shop.id, title: title.trim(), slug: draftSlug(), status: 'draft' }).$returningId()
  await afterBuildChanged(row!.id)
  return row!.id
}

/** The owner's whole view of a build: fields, parts, photos, pulls with their reports, and what publishing still needs. */
export async function editorBuild(db: Database, shop: ShopRef, buildId: number): Promise<EditorBuild> {
  const build = await ownBuild(db, shop, buildId)
  const [parts, photos, pulls] = await Promise.all([
    db.select().from(buildParts).where(eq(buildParts.buildId, buildId)).orderBy(asc(buildParts.position)),
    db.select().from(buildPhotos).where(eq(buildPhotos.buildId, buildId)).orderBy(asc(buildPhotos.position), asc(buildPhotos.id)),
    db.select().from(dynoPulls).where(eq(dynoPulls.buildId, buildId)).orderBy(asc(dynoPulls.id)),
  ])
  const live = pulls.filter(p => p.status !== 'rejected').length
  return {
    id: build.id,
    slug: build.slug,
    status: build.status,
    publishedAt: build.publishedAt?.toISOString() ?? null,
    verified: build.verifiedAt !== null,
    updatedAt: build.updatedAt.toISOString(),
    fields: fieldsOf(build),
    parts: parts.map(p => ({ position: p.position, category: p.category, part: p.part, partNumber: p.partNumber, quantity: p.quantity, unitPriceCents: p.unitPriceCents })),
    photos: photos.map(p => ({ id: p.id, caption: p.caption, url: `/api/me/builds/${buildId}/photos/${p.id}` })),
    pulls: pulls.map(p => ({
      id: p.id,
      label: p.label,
      status: p.status,
      dynoKind: p.dynoKind,
      declaredStandard: p.declaredStandard,
      comparisonRole: p.comparisonRole,
      changeKind: p.changeKind,
      changeNote: p.changeNote,
      summary: p.summary,
      checks: p.checks ?? [],
      reviewNote: p.reviewNote,
      hasSheet: p.sheetFileId !== null,
      createdAt: p.createdAt.toISOString(),
    })),
    publishIssues: publishIssues(build, live),
  }
}

/**
 * An autosave: the fields sent replace the stored ones, a parts list replaces the whole list, in one
 * transaction. A published build stays publishable: a change that would break the publish check
 * answers 422 and nothing is written. The patch is the validated `buildPatch`. A change to the
 * checked combination sends verified pulls back to the queue; given the stored-file reader, the
 * reports of the pulls awaiting review are then re-run against the new combination.
 */
export async function updateBuild(db: Database, shop: ShopRef, buildId: number, patch: BuildPatch, read?: ReadStoredText): Promise<void> {
  const { parts, ...columns } = patch
  await inRetriedTransaction(db, async (tx) => {
    const build = await ownBuild(tx, shop, buildId, true)
    if (build.status === 'published') {
      const merged = { ...build, ...columns } as Build
      const issues = publishIssues(merged, 1)
      if (issues.length) throw createError({ status: 422, message: `A published build must stay complete: ${issues.map(i => `${i.path}: ${i.message}`).join('; ')}.`, data: { issues } })
    }
    if (Object.keys(columns).length) await tx.update(builds).set(columns).where(eq(builds.id, buildId))
    // A verification holds for the combination it was checked against: when the bore, stroke,
    // cylinders or aspiration change, verified pulls go back to the queue and the mark comes off.
    const changed = CHECKED_COMBINATION_FIELDS.filter(f => f in columns && columns[f] !== undefined && columns[f] !== build[f])
    if (changed.length) {
      const [sent] = await tx.update(dynoPulls).set({
        status: 'submitted',
        reviewedAt: null,
        reviewNote: `Sent back for a new check: the ${changed.map(f => COMBINATION_FIELD_WORDS[f]).join(', ')} changed after it was verified.`,
      }).where(and(eq(dynoPulls.buildId, buildId), eq(dynoPulls.status, 'verified')))
      if (sent.affectedRows > 0) await refreshHeadline(tx, buildId)
    }
    if (parts) {
      if (parts.length > MAX_PARTS) throw createError({ status: 422, message: `A parts list has at most ${MAX_PARTS} rows.` })
      await tx.delete(buildParts).where(eq(buildParts.buildId, buildId))
      if (parts.length) await tx.insert(buildParts).values(parts.map((p, position) => ({ ...p, buildId, position })))
      // The row's updated_at marks the autosave even when only the parts changed.
      if (!Object.keys(columns).length) await tx.update(builds).set({ updatedAt: new Date() }).where(eq(builds.id, buildId))
    }
    await recordBuildChange(tx, buildId)
  })
  await afterBuildChanged(buildId)
  // The evidence reports of pulls awaiting review follow the combination they are checked against.
  if (read && CHECKED_COMBINATION_FIELDS.some(field => field in patch)) await recheckSubmittedPulls(db, buildId, read)
}

/** A slug for a first publish: the title's words, with -2, -3… when another build has them. */
async function freeSlug(tx: Tx, buildId: number, title: string): Promise<string> {
  const base = buildSlug(title)
  const taken = new Set((await tx.select({ slug: builds.slug }).from(builds).where(and(like(builds.slug, `${base}%`), ne(builds.id, buildId)))).map(r => r.slug))
  return firstFreeSlug(base, taken)
}

const TRANSITIONS: Record<'publish' | 'unpublish' | 'archive' | 'restore', { from: Build['status'][], to: Build['status'] }> = {
  publish: { from: ['draft'], to: 'published' },
  unpublish: { from: ['published'], to: 'draft' },
  archive: { from: ['draft', 'published'], to: 'archived' },
  restore: { from: ['archived'], to: 'draft' },
}

/**
 * Moves a build between draft, published and archived. Publishing runs the publish check over the
 * stored row (422 naming each field) and needs a pull to show; the first publish settles the
 * build's address from its title. Returns the build's slug.
 */
export async function changeStatus(db: Database, shop: ShopRef, buildId: number, action: keyof typeof TRANSITIONS): Promise<{ status: Build['status'], slug: string }> {
  const rule = TRANSITIONS[action]
  const result = await inRetriedTransaction(db, async (tx) => {
    const build = await ownBuild(tx, shop, buildId, true)
    if (!rule.from.includes(build.status)) throw createError({ status: 409, message: `A build that is ${build.status} cannot be asked to ${action}.` })
    if (action !== 'publish') {
      await tx.update(builds).set({ status: rule.to }).where(eq(builds.id, buildId))
      await recordBuildChange(tx, buildId)
      return { status: rule.to, slug: build.slug }
    }
    const issues = publishIssues(build, await livePullCount(tx, buildId))
    if (issues.length) throw createError({ status: 422, message: `Not ready to publish: ${issues.map(i => `${i.path}: ${i.message}`).join('; ')}.`, data: { issues } })
    const slug = build.publishedAt ? build.slug : await freeSlug(tx, buildId, build.title)
    await tx.update(builds).set({ status: 'published', slug, publishedAt: build.publishedAt ?? new Date() }).where(eq(builds.id, buildId))
    await refreshHeadline(tx, buildId)
    await recordBuildChange(tx, buildId)
    return { status: 'published' as const, slug }
  })
  await afterBuildChanged(buildId)
  return result
}

/**
 * Deletes a build with its parts, photos and pulls and every file they stored: the rows in one
 * transaction, then the stored files once it has committed.
 */
export async function deleteBuild(db: Database, store: UploadStore, shop: ShopRef, buildId: number): Promise<void> {
  const keys = await inRetriedTransaction(db, async (tx) => {
    await ownBuild(tx, shop, buildId, true)
    const pulls = await tx.select({ fileId: dynoPulls.fileId, sheetFileId: dynoPulls.sheetFileId }).from(dynoPulls).where(eq(dynoPulls.buildId, buildId))
    const photos = await tx.select({ fileId: buildPhotos.fileId }).from(buildPhotos).where(eq(buildPhotos.buildId, buildId))
    const fileIds = [...pulls.flatMap(p => [p.fileId, p.sheetFileId]), ...photos.map(p => p.fileId)].filter((id): id is number => id !== null)
    await tx.delete(dynoPulls).where(eq(dynoPulls.buildId, buildId))
    await tx.delete(buildPhotos).where(eq(buildPhotos.buildId, buildId))
    await tx.delete(buildParts).where(eq(buildParts.buildId, buildId))
    try {
      await tx.delete(builds).where(eq(builds.id, buildId))
    }
    catch (error) {
      // Another table (a quote request, an order) still points at the build.
      if ((error as { errno?: number }).errno === 1451 || (error as { cause?: { errno?: number } }).cause?.errno === 1451) {
        throw createError({ status: 409, message: 'This build is part of a quote or an order, so it cannot be deleted; archive it instead.' })
      }
      throw error
    }
    await recordBuildChange(tx, buildId)
    return deleteFileRows(tx, fileIds)
  })
  await discard(store, keys)
  await afterBuildChanged(buildId)
}
