import { slugParams } from '#shared/schemas/common'
import { getBuilderProfile } from '../../services/listings'

/** A shop's public profile and published builds. Public. */
export default defineEventHandler(async (event) => {
  const { slug } = await getValidatedRouterParams(event, validator(slugParams))
  const builder = await getBuilderProfile(useDb(), slug)
  if (!builder) throw createError({ status: 404, message: 'No shop has that address.' })
  return builder
})
