import { defineAccess } from '../../support/access'

const everyone = (status: number) => ({ anonymous: status, racer: status, shop: status, admin: status })
const adminOnly = (status: number) => ({ anonymous: 401, racer: 403, shop: 403, admin: status })
const signedIn = (status: number) => ({ anonymous: 401, racer: status, shop: status, admin: status })

// Order 1 is Alma's with Harrow Creek (`shop`); the demo reviews (scripts/lib/seed-reviews.ts) come
// after every other demo deal, so review 1 is Freya's of Tallgrass: no persona wrote it or owns the shop.
// Bodies that pass validation stop at the ownership check (403), so the matrix writes nothing.
const review = { rating: 4, body: 'A valid review body that is long enough to pass.' }

export default defineAccess([
  { method: 'POST', path: '/api/orders/1/review', body: {}, expect: { anonymous: 401, racer: 404, shop: 403, otherShop: 404, admin: 403 } },
  { method: 'GET', path: '/api/orders/1/review', expect: { anonymous: 401, racer: 404, shop: 200, otherShop: 404, admin: 200 } },
  { method: 'GET', path: '/api/orders/not-a-number/review', expect: signedIn(400) },
  { method: 'PATCH', path: '/api/reviews/1', body: review, expect: signedIn(403) },
  { method: 'PATCH', path: '/api/reviews/1', body: {}, expect: signedIn(400) },
  { method: 'POST', path: '/api/reviews/1/answer', body: { body: 'Thanks for the kind words.' }, expect: signedIn(403) },
  { method: 'POST', path: '/api/admin/reviews/1/hide', body: {}, expect: adminOnly(400) },
  { method: 'GET', path: '/api/admin/reviews', expect: adminOnly(200) },
  { method: 'GET', path: '/api/builders/tallgrass-racing-engines/reviews', expect: everyone(200) },
  { method: 'GET', path: '/api/builders/no-such-shop/reviews', expect: everyone(404) },
  { method: 'GET', path: '/api/builds/no-such-build/reviews', expect: everyone(404) },
  { method: 'GET', path: '/api/builds/Not_A_Slug/reviews', expect: everyone(400) },
  { method: 'GET', path: '/api/builders/tallgrass-racing-engines/record', expect: everyone(200) },
  { method: 'GET', path: '/api/builders/tallgrass-racing-engines/record/on-time', expect: everyone(200) },
  { method: 'GET', path: '/api/builders/tallgrass-racing-engines/record/nonsense', expect: everyone(400) },
  { method: 'GET', path: '/api/builders/no-such-shop/record', expect: everyone(404) },
])
