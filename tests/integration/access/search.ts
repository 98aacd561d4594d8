import { defineAccess } from '../../support/access'

const everyone = (status: number) => ({ anonymous: status, racer: status, builder: status, admin: status })
const adminOnly = { anonymous: 401, racer: 403, builder: 403, admin: 200 }

/** Search is public to read; the test-mode sync and check hooks are for admins. */
export default defineAccess([
  { method: 'GET', path: '/api/search?perPage=5', expect: everyone(200) },
  { method: 'GET', path: '/api/search?q=supercharged&aspiration=na&aspiration=turbo&bandFrom=4000&bandTo=6000&sort=band', expect: everyone(200) },
  { method: 'GET', path: '/api/search?sort=band', expect: everyone(400) },
  { method: 'GET', path: '/api/builders/for-target?ci=427&hp=700', expect: everyone(200) },
  { method: 'GET', path: '/api/builders/for-target?hp=700', expect: everyone(400) },
  { method: 'POST', path: '/api/testing/search/sync', body: { buildId: 1 }, expect: adminOnly },
  { method: 'POST', path: '/api/testing/search/check', body: {}, expect: adminOnly },
])
