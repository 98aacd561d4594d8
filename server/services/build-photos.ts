import { createError } from 'h3'
import { and, asc, count, eq, max } from 'drizzle-orm'
import { buildPhotos, builds, files } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import { afterBuildChanged } from './build-events'
import { ownBuild, type ShopRef } from './own-build'
import { deleteFileRows, discard, insertFileRow, vetUpload, withStagedFiles, type IncomingFile, type UploadStore } from './build-files'
import { recordBuildChange } from './search-feed'

/** Most photos one build shows. */
export const MAX_PHOTOS = 12

/** Adds a photo (sniffed: PNG, JPEG or WebP; size-limited) at the end of the build's photos. Returns its id. */
export async function addPhoto(db: Database, store: UploadStore, shop: ShopRef, buildId: number, input: { file: IncomingFile, caption: string }): Promise<number> {
  await ownBuild(db, shop, buildId)
  const mime = await vetUpload('photo', input.file, 'photo')
  const id = await withStagedFiles(db, store, [{ kind: 'photo', mime, file: input.file }], async (tx, [staged]) => {
    await ownBuild(tx, shop, buildId, true)
    const [stats] = await tx.select({ n: count(), last: max(buildPhotos.position) }).from(buildPhotos).where(eq(buildPhotos.buildId, buildId))
    if ((stats?.n ?? 0) >= MAX_PHOTOS) throw createError({ status: 409, message: `A build shows at most ${MAX_PHOTOS} photos; remove one first.` })
    const fileId = await insertFileRow(tx, shop.userId, staged!)
    const [row] = await tx.insert(buildPhotos).values({ buildId, fileId, position: (stats?.last ?? -1) + 1, caption: input.caption }).$returningId()
    await recordBuildChange(tx, buildId)
    return row!.id
  })
  await afterBuildChanged(buildId)
  return id
}

/** Removes a photo and its stored file. */
export async function removePhoto(db: Database, store: UploadStore, shop: ShopRef, buildId: number, photoId: number): Promise<void> {
  const keys = await inRetriedTransaction(db, async (tx) => {
    await ownBuild(tx, shop, buildId, true)
    const [photo] = await tx.select().from(buildPhotos).where(and(eq(buildPhotos.id, photoId), eq(buildPhotos.buildId, buildId)))
    if (!photo) throw createError({ status: 404, message: 'That build has no such photo.' })
    await tx.delete(buildPhotos).where(eq(buildPhotos.id, photoId))
    await recordBuildChange(tx, buildId)
    return deleteFileRows(tx, [photo.fileId])
  })
  await discard(store, keys)
  await afterBuildChanged(buildId)
}

/** Where a photo is stored, when it belongs to the build; `publishedSlug` limits it to a published build. */
export async function photoFile(db: Database, where: { photoId: number, buildId?: number, publishedSlug?: string }) {
  const conditions = [eq(buildPhotos.id, where.photoId)]
  if (where.buildId !== undefined) conditions.push(eq(buildPhotos.buildId, where.buildId))
  if (where.publishedSlug !== undefined) conditions.push(eq(builds.slug, where.publishedSlug), eq(builds.status, 'published'))
  const [row] = await db.select({ storageKey: files.storageKey, mime: files.mime }).from(buildPhotos)
    .innerJoin(builds, eq(builds.id, buildPhotos.buildId))
    .innerJoin(files, eq(files.id, buildPhotos.fileId))
    .where(and(...conditions))
    .orderBy(asc(buildPhotos.id))
    .limit(1)
  return row ?? null
}
