import { newBuildSchema } from '#shared/schemas/build'
import { createDraft } from '../../../services/build-editor'

/** A new draft build with only its title. Shops with a shop only. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  const { title } = await readValidatedBody(event, validator(newBuildSchema))
  const id = await createDraft(useDb(), shop, title)
  setResponseStatus(event, 201)
  return { id }
})
