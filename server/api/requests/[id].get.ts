import { idParams } from '#shared/schemas/common'
import { getRequestView } from '../../services/deals'

/** One request with its quote (every revision) and order; its parties only (404 for anyone else). */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { actor } = await requireRequestAccess(event, id)
  return getRequestView(useDealContext(), actor, id)
})
