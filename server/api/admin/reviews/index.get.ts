import { adminReviews } from '../../../services/reviews'

/** Every review, newest first, hidden ones included, for moderation. Admins only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'admin')
  return { reviews: await adminReviews(useDb()) }
})
