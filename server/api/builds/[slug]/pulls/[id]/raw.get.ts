import { and, eq, inArray } from 'drizzle-orm'
import { z } from 'zod'
import { idSchema, slugSchema } from '#shared/schemas/common'
import { builds, dynoPulls, files } from '../../../../../database/schema'

const params = z.object({ slug: slugSchema, id: idSchema })

/**
 * One pull's raw file exactly as the shop uploaded it, with its SHA-256 (the same checksum the build page
 * and the printed sheet show) in `Repr-Digest` (RFC 9530). Public for the pulls a published build shows.
 */
export default defineEventHandler(async (event) => {
  const { slug, id } = await getValidatedRouterParams(event, validator(params))
  const [row] = await useDb().select({ storageKey: files.storageKey, name: files.originalName, mime: files.mime, sha256: files.sha256 })
    .from(dynoPulls).innerJoin(builds, eq(builds.id, dynoPulls.buildId)).innerJoin(files, eq(files.id, dynoPulls.fileId))
    .where(and(eq(builds.slug, slug), eq(builds.status, 'published'), eq(dynoPulls.id, id), inArray(dynoPulls.status, ['submitted', 'verified'])))
    .limit(1)
  if (!row) throw createError({ status: 404, message: 'That build has no such pull.' })
  setResponseHeader(event, 'repr-digest', `sha-256=:${Buffer.from(row.sha256, 'hex').toString('base64')}:`)
  setResponseHeader(event, 'x-checksum-sha256', row.sha256)
  return sendStoredDownload(event, { storageKey: row.storageKey, name: row.name, mime: row.mime })
})
