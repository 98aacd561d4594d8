import { forTargetQuery } from '#shared/schemas/search'
import { rankShopsForTarget } from '../../../search/rank'
import { useSearchIndex } from '../../services/search'

/** Shops ranked by their verified builds near a displacement and power target. Public. */
export default defineEventHandler(async (event) => {
  const query = await getValidatedQuery(event, validator(forTargetQuery))
  const index = await useSearchIndex()
  return rankShopsForTarget(index, { ci: query.ci as number, hp: query.hp as number, aspiration: query.aspiration, fuel: query.fuel, limit: query.limit })
})
