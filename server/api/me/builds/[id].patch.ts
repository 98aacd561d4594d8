import { buildPatch } from '#shared/schemas/build'
import { idParams } from '#shared/schemas/common'
import { editorBuild, updateBuild } from '../../../services/build-editor'

/** An autosave of some fields and/or the whole parts list; answers the updated owner's view. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const patch = await readValidatedBody(event, validator(buildPatch))
  const db = useDb()
  await updateBuild(db, shop, id, patch, readUploadText)
  return editorBuild(db, shop, id)
})
