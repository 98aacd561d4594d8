import { RECORD_FIGURE_LABELS } from '#shared/reviews/track-record'
import { recordFigureParams } from '#shared/schemas/reviews'
import { figureItems, shopRecord } from '../../../../services/track-record'
import { loadActor } from '../../../../services/deal-context'

/**
 * The deals one figure of a shop's record counts. Public, anonymised: a deal is a number and a month
 * with how it counted; its parties (and admins) also see its title and a link to it.
 */
export default defineEventHandler(async (event) => {
  const { slug, figure } = await getValidatedRouterParams(event, validator(recordFigureParams))
  const found = await shopRecord(useDb(), slug)
  if (!found) throw createError({ status: 404, message: 'No shop has that address.' })
  const user = await requireUser(event).catch(() => null)
  const actor = user ? await loadActor(useDb(), user.id) : null
  const viewer = actor ? { userId: actor.id, role: actor.role, shopId: actor.shopId } : null
  return {
    shop: { slug: found.shop.slug, name: found.shop.shopName },
    figure,
    label: RECORD_FIGURE_LABELS[figure],
    items: figureItems(found.deals, figure, found.shop.id, viewer),
  }
})
