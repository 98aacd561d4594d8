import { defineAccess } from '../../support/access'

const signedIn = (status: number) => ({ anonymous: 401, racer: status, shop: status, admin: status })

// The demo deals (scripts/lib/seed-deals.ts) come first in the fresh test database:
//   request 1, quote 1, order 1 with milestones 1–3: Alma (a racer who is not a persona) with Harrow Creek (shop);
//   request 2: Jonah (racer) with Ninefold (otherShop), no quote yet.
// So `racer` is a stranger to deal 1, `shop` to deal 2, and an admin may look at both but act on neither.
// Write rows send empty bodies: a caller who gets past the guard stops at validation (400), nothing is written.
const dealOne = (party: number, admin: number) => ({ anonymous: 401, racer: 404, shop: party, otherShop: 404, admin })

export default defineAccess([
  { method: 'GET', path: '/api/requests', expect: signedIn(200) },
  { method: 'POST', path: '/api/requests', body: {}, expect: { anonymous: 401, racer: 400, shop: 403, admin: 403 } },
  { method: 'GET', path: '/api/requests/1', expect: dealOne(200, 200) },
  { method: 'GET', path: '/api/requests/2', expect: { anonymous: 401, racer: 200, shop: 404, otherShop: 200, admin: 200 } },
  { method: 'GET', path: '/api/requests/999999', expect: signedIn(404) },
  { method: 'GET', path: '/api/requests/not-a-number', expect: signedIn(400) },
  { method: 'GET', path: '/api/requests/1/messages', expect: dealOne(200, 200) },
  { method: 'GET', path: '/api/requests/1/messages?after=-1', expect: dealOne(400, 400) },
  { method: 'POST', path: '/api/requests/1/messages', body: {}, expect: dealOne(400, 403) },
  { method: 'POST', path: '/api/requests/2/messages', body: {}, expect: { anonymous: 401, racer: 400, shop: 404, otherShop: 400, admin: 403 } },
  { method: 'POST', path: '/api/requests/1/quote', body: {}, expect: dealOne(400, 403) },
  { method: 'POST', path: '/api/requests/2/quote', body: {}, expect: { anonymous: 401, racer: 403, shop: 404, otherShop: 400, admin: 403 } },
  { method: 'POST', path: '/api/quotes/1/accept', body: {}, expect: dealOne(403, 403) },
  { method: 'POST', path: '/api/quotes/1/decline', body: {}, expect: dealOne(403, 403) },
  { method: 'GET', path: '/api/orders/1', expect: dealOne(200, 200) },
  { method: 'GET', path: '/api/orders/999999', expect: signedIn(404) },
  { method: 'POST', path: '/api/orders/1/cancel', body: {}, expect: dealOne(400, 403) },
  { method: 'POST', path: '/api/orders/1/change-orders', body: {}, expect: dealOne(400, 403) },
  { method: 'POST', path: '/api/orders/1/change-orders/1/accept', expect: dealOne(403, 403) },
  { method: 'POST', path: '/api/orders/1/change-orders/1/decline', body: {}, expect: dealOne(403, 403) },
  { method: 'POST', path: '/api/milestones/1/checkout', expect: dealOne(403, 403) },
  { method: 'POST', path: '/api/milestones/1/submit', body: {}, expect: dealOne(400, 403) },
  { method: 'POST', path: '/api/milestones/1/delivery-pull', body: {}, expect: dealOne(400, 403) },
  { method: 'POST', path: '/api/milestones/1/approve', expect: dealOne(403, 403) },
  { method: 'POST', path: '/api/milestones/1/dispute', body: {}, expect: dealOne(403, 403) },
  { method: 'GET', path: '/api/messages/unread', expect: signedIn(200) },
  // The caller's own notifications: every signed-in role reads its own list (an admin's is empty); writes stop at validation.
  { method: 'GET', path: '/api/me/notifications', expect: signedIn(200) },
  { method: 'GET', path: '/api/me/notifications?perPage=0', expect: signedIn(400) },
  { method: 'POST', path: '/api/me/notifications/read', body: {}, expect: signedIn(400) },
  { method: 'PATCH', path: '/api/me/notifications/settings', body: {}, expect: signedIn(400) },
  { method: 'POST', path: '/api/attachments', expect: signedIn(400) },
  { method: 'GET', path: '/api/attachments/999999', expect: signedIn(404) },
  { method: 'POST', path: '/api/webhooks/stripe', body: {}, publicWrite: 'the payment service calls it; the signature over the raw body is the guard', expect: { anonymous: 400, racer: 400, shop: 400, admin: 400 } },
])
