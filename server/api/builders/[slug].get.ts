import { slugParams } from '#shared/schemas/common'
import { getShop } from '../../services/builds'

/** A shop's public profile and published builds. Public. */
export default defineEventHandler(async (event) => {
  const { slug } = await getValidatedRouterParams(event, validator(slugParams))
  const shop = await getShop(useDb(), slug)
  if (!shop) throw createError({ status: 404, message: 'No shop has that address.' })
  return shop
})
