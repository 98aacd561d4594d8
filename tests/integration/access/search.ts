import { defineAccess } from '../../support/access'

const everyone = (status: number) => ({ anonymous: status, racer: status, shop: status, admin: status })
const adminOnly = { anonymous: 401, racer: 403, shop: 403, admin: 200 }
const signedIn = (status: number) => ({ anonymous: 401, racer: status, shop: status, admin: status })

/**
 * Search is public to read; the test-mode sync and check hooks are for admins. Saved searches belong
 * to any signed-in account: the sample bodies stop at validation and the ids reach no one's row,
 * so the matrix writes nothing (owners and strangers are tested in saved-searches.test.ts).
 */
export default defineAccess([
  { method: 'GET', path: '/api/search?perPage=5', expect: everyone(200) },
  { method: 'GET', path: '/api/search?q=supercharged&aspiration=na&aspiration=turbo&bandFrom=4000&bandTo=6000&sort=band', expect: everyone(200) },
  { method: 'GET', path: '/api/search?sort=band', expect: everyone(400) },
  { method: 'GET', path: '/api/builders/for-target?ci=427&hp=700', expect: everyone(200) },
  { method: 'GET', path: '/api/builders/for-target?hp=700', expect: everyone(400) },
  { method: 'POST', path: '/api/testing/search/sync', body: { buildId: 1 }, expect: adminOnly },
  { method: 'POST', path: '/api/testing/search/check', body: {}, expect: adminOnly },
  { method: 'GET', path: '/api/me/searches', expect: signedIn(200) },
  { method: 'POST', path: '/api/me/searches', body: {}, expect: signedIn(400) },
  { method: 'POST', path: '/api/me/searches', body: { name: 'Only a band', query: { bandFrom: 4000, bandTo: 6000 } }, expect: signedIn(400) },
  { method: 'PATCH', path: '/api/me/searches/999999999', body: {}, expect: signedIn(400) },
  { method: 'PATCH', path: '/api/me/searches/999999999', body: { emailOn: false }, expect: signedIn(404) },
  { method: 'DELETE', path: '/api/me/searches/999999999', expect: signedIn(404) },
  { method: 'DELETE', path: '/api/me/searches/not-a-number', expect: signedIn(400) },
])
