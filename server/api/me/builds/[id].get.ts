import { idParams } from '#shared/schemas/common'
import { editorBuild } from '../../../services/build-editor'

/** The owner's view of one build (drafts included). 404 for another shop's draft, 403 for its published build. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  return editorBuild(useDb(), shop, id)
})
