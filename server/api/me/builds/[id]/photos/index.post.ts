import { z } from 'zod'
import { idParams } from '#shared/schemas/common'
import { addPhoto } from '../../../../../services/build-photos'
import { ownBuild } from '../../../../../services/own-build'

const caption = z.string().trim().max(160, 'A caption is at most 160 characters').default('')

/** Adds a photo (PNG, JPEG or WebP, sniffed; size-limited) to one of the caller's builds. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  // Only the owner's upload is read at all.
  await ownBuild(useDb(), shop, id)
  const form = await readUploadForm(event, UPLOAD_LIMITS.photo + FORM_OVERHEAD_BYTES)
  const file = requireFormFile(form, 'photo', 'the photo')
  const photoId = await addPhoto(useDb(), uploadStore(), shop, id, { file, caption: validator(caption)(form.fields.caption) })
  setResponseStatus(event, 201)
  return { id: photoId }
})
