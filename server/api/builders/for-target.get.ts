import { forTargetQuery } from '#shared/schemas/search'
import { rankShopsForTarget } from '../../../search/rank'
import { useSearchIndex } from '../../services/search'

/**
 * Shops ranked by their verified builds near a displacement and power target. Public. With `ciMin` and
 * `ciMax` the racer's own displacement range is kept as it is (`ci` defaults to its middle).
 */
export default defineEventHandler(async (event) => {
  const query = await getValidatedQuery(event, validator(forTargetQuery))
  const index = await useSearchIndex()
  const ci = query.ci ?? ((query.ciMin as number) + (query.ciMax as number)) / 2
  return rankShopsForTarget(index, { ci, ciMin: query.ciMin, ciMax: query.ciMax, hp: query.hp as number, aspiration: query.aspiration, fuel: query.fuel, limit: query.limit })
})
