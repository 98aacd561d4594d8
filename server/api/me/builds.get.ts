import { listOwnBuilds } from '../../services/shops'

/** The caller's shop builds, drafts included, for the shop dashboard. Shops only. */
export default defineEventHandler(async (event) => {
  const { shop } = await requireCallerShop(event)
  return { shop: { slug: shop.slug, shopName: shop.shopName, region: shop.region, bio: shop.bio }, builds: await listOwnBuilds(useDb(), shop.id) }
})
