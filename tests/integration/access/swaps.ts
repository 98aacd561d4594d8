import { defineAccess } from '../../support/access'

const everyone = (status: number) => ({ anonymous: status, racer: status, shop: status, admin: status })
const racerOnly = (status: number) => ({ anonymous: 401, racer: status, shop: 403, admin: 403 })

/**
 * Swap results are public to read. Class rules belong to racers: a shop or an admin is refused (403)
 * before its body is read. The PUT sample stops at validation, so the matrix writes nothing (a racer's
 * own save is tested in class-rules.test.ts).
 */
export default defineAccess([
  { method: 'GET', path: '/api/swaps?change=heads', expect: everyone(200) },
  { method: 'GET', path: '/api/swaps?change=camshaft&ciMin=300&ciMax=450&aspiration=na&fuel=e85&bandFrom=4000&bandTo=6500', expect: everyone(200) },
  { method: 'GET', path: '/api/swaps', expect: everyone(400) },
  { method: 'GET', path: '/api/swaps?change=turbo', expect: everyone(400) },
  { method: 'GET', path: '/api/me/class', expect: racerOnly(200) },
  { method: 'PUT', path: '/api/me/class', body: { displacementCapCi: 'big' }, expect: racerOnly(400) },
])
