import { uploadQuery } from '#shared/schemas/deals'
import { storeDealFile } from '../../services/deal-files'

/**
 * Uploads one file for a deal (the body is the file's bytes; kind and name in the query): vetted by the
 * file service as a build upload is (empty 422, size 413, sniffed type 415), hashed, and recorded as
 * the uploader's until it is attached.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  const { kind, name } = await getValidatedQuery(event, validator(uploadQuery))
  const bytes = await readLimitedBody(event, UPLOAD_LIMITS[kind])
  const mime = await vetUpload(kind, { bytes, name }, 'upload')
  const hash = sha256(bytes)
  setResponseStatus(event, 201)
  return storeDealFile(useDb(), uploadStore(), actor.id, { name, bytes, mime, sha256: hash, storageKey: storageKeyFor(kind, hash, mime), kind })
})
