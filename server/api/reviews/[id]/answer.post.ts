import { idParams } from '#shared/schemas/common'
import { reviewAnswerSchema } from '#shared/schemas/reviews'
import { answerReview } from '../../../services/reviews'

/** The reviewed shop answers a review once, publicly. */
export default defineEventHandler(async (event) => {
  const actor = await requireDealActor(event)
  if (actor.role !== 'builder') throw createError({ status: 403, message: 'Only the reviewed shop answers a review.' })
  const { id } = await getValidatedRouterParams(event, validator(idParams))
  const { body } = await readValidatedBody(event, validator(reviewAnswerSchema))
  await answerReview(useDb(), actor, id, body)
  // Reviews show on the build and shop pages: the cached public pages go at once.
  await invalidatePublicCache()
  return { ok: true }
})
