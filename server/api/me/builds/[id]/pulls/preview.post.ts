import { pullMetaSchema } from '#shared/schemas/build'
import { idParams } from '#shared/schemas/common'
import { previewPull } from '../../../../../services/evidence-uploads'
import { ownBuild } from '../../../../../services/own-build'

/** Parses a pull file and runs the evidence checks without saving: 413 too large, 415 not text, 422 errors by row. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  // Only the owner's upload is read at all.
  await ownBuild(useDb(), shop, id)
  const form = await readUploadForm(event, UPLOAD_LIMITS.pull + FORM_OVERHEAD_BYTES)
  const meta = formJson(form, 'meta', pullMetaSchema)
  const pull = requireFormFile(form, 'pull', 'the pull file')
  return previewPull(useDb(), shop, id, { pull, meta })
})
