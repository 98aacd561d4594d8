import { uploadQuery } from '#shared/schemas/deals'
import { storeDealFile } from '../../services/deal-files'

/**
 * Uploads one file for a deal (the body is the file's bytes; kind and name in the query): limited
 * by size, sniffed by content, hashed, and recorded as the uploader's until it is attached.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  const { kind, name } = await getValidatedQuery(event, validator(uploadQuery))
  const bytes = await readLimitedBody(event, UPLOAD_LIMITS[kind])
  if (bytes.length === 0) throw createError({ status: 400, message: 'The upload is empty.' })
  const mime = await sniffUpload(kind, bytes)
  const hash = sha256(bytes)
  setResponseStatus(event, 201)
  return storeDealFile(useDb(), useStorage('uploads'), actor.id, { name, bytes, mime, sha256: hash, storageKey: storageKeyFor(kind, hash, mime), kind })
})
