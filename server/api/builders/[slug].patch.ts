import { shopPatchSchema } from '#shared/schemas/auth'
import { slugParams } from '#shared/schemas/common'
import { afterBuildChanged } from '../../services/build-events'
import { updateShop } from '../../services/shops'

/** Changes a shop's name, region or description. Only the shop who owns the shop; others get 403, an unknown shop 404. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'builder')
  const { slug } = await getValidatedRouterParams(event, validator(slugParams))
  const { shop } = await requireOwnShop(event, slug)
  const patch = await readValidatedBody(event, validator(shopPatchSchema))
  const { shop: updated, buildIds } = await updateShop(useDb(), shop.id, patch)
  // The shop's name and region show on its public builds: this instance's index and caches now
  // (other instances read the same change from the feed).
  for (const id of buildIds) await afterBuildChanged(id)
  await invalidatePublicCache()
  return { slug: updated.slug, shopName: updated.shopName, region: updated.region, bio: updated.bio }
})
