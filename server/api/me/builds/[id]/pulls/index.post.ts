import { pullMetaSchema } from '#shared/schemas/build'
import { idParams } from '#shared/schemas/common'
import { savePull } from '../../../../../services/evidence-uploads'
import { ownBuild } from '../../../../../services/own-build'

/**
 * Saves a pull (file, optional sheet, metadata) as submitted, awaiting an admin's verification. Nothing is
 * stored when the upload is too large (413), the wrong type (415) or does not parse (422).
 */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  // Only the owner's upload is read at all.
  await ownBuild(useDb(), shop, id)
  const form = await readUploadForm(event, UPLOAD_LIMITS.pull + UPLOAD_LIMITS.sheet + FORM_OVERHEAD_BYTES)
  const meta = formJson(form, 'meta', pullMetaSchema)
  const pull = requireFormFile(form, 'pull', 'the pull file')
  const saved = await savePull(useDb(), uploadStore(), shop, id, { pull, sheet: form.files.sheet ?? null, meta })
  setResponseStatus(event, 201)
  return saved
})
