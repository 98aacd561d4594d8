import { idParams } from '#shared/schemas/common'
import { readableFile } from '../../services/deal-files'

/** Downloads a deal file: the uploader's own, or one attached to a deal the reader is a party to (404 otherwise). */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const file = await readableFile(useDb(), actor, id)
  if (!file) throw createError({ status: 404, message: 'That file was not found, or it is not yours to see.' })
  return sendStoredDownload(event, { storageKey: file.storageKey, name: file.originalName, mime: file.mime }, { cacheControl: 'private, no-store', charset: false })
})
