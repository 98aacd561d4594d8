import { defineAccess } from '../../support/access'

const everyone = (status: number) => ({ anonymous: status, racer: status, shop: status, admin: status })
const signedIn = (status: number) => ({ anonymous: 401, racer: status, shop: status, admin: status })
const adminOnly = (status: number) => ({ anonymous: 401, racer: 403, shop: 403, admin: status })

// Sample bodies are empty on purpose: a request that passes the guard stops at validation (400),
// so the matrix proves who gets past the guard without writing anything.
export default defineAccess([
  // Auth.js's own routes (server/api/auth/[...].ts). Its writes refuse a missing CSRF token with a redirect.
  { method: 'GET', path: '/api/auth/session', expect: everyone(200) },
  { method: 'GET', path: '/api/auth/csrf', expect: everyone(200) },
  { method: 'GET', path: '/api/auth/providers', expect: everyone(200) },
  { method: 'POST', path: '/api/auth/callback/password', form: { email: 'x@example.test', password: 'nothing-here' }, publicWrite: 'signing in is what anonymous visitors do; no CSRF token → redirect', expect: everyone(302) },
  { method: 'POST', path: '/api/auth/signout', form: {}, publicWrite: 'signing out needs the CSRF token first → redirect', expect: everyone(302) },

  // Sign-up and e-mailed links are for people without a session.
  { method: 'POST', path: '/api/account/sign-up', body: {}, publicWrite: 'sign-up makes the account', expect: everyone(400) },
  { method: 'POST', path: '/api/account/sign-in-link', body: {}, publicWrite: 'asking for a sign-in link is how a visitor without a password signs in', expect: everyone(400) },

  // The signed-in user's own account.
  { method: 'GET', path: '/api/me', expect: signedIn(200) },
  { method: 'PATCH', path: '/api/me', body: {}, expect: signedIn(400) },
  { method: 'POST', path: '/api/me/password', body: {}, expect: signedIn(400) },
  { method: 'POST', path: '/api/me/email', body: {}, expect: signedIn(400) },
  { method: 'POST', path: '/api/account/sign-out', body: {}, expect: signedIn(400) },

  // A shop's own rows: each shop reads their own; only the owner may change a shop.
  { method: 'GET', path: '/api/me/builds', expect: { anonymous: 401, racer: 403, shop: 200, otherShop: 200, admin: 403 } },
  { method: 'PATCH', path: '/api/builders/harrow-creek-engine-works', body: {}, expect: { anonymous: 401, racer: 403, shop: 400, otherShop: 403, admin: 403 } },
  { method: 'PATCH', path: '/api/builders/no-such-shop', body: {}, expect: { anonymous: 401, racer: 403, shop: 404, admin: 403 } },

  // Admin work.
  { method: 'GET', path: '/api/admin/users', expect: adminOnly(200) },
  { method: 'GET', path: '/api/admin/users?role=nobody', expect: adminOnly(400) },
  { method: 'PATCH', path: '/api/admin/users/1', body: {}, expect: adminOnly(400) },
  { method: 'PATCH', path: '/api/admin/users/999999999', body: { suspended: true }, expect: adminOnly(404) },
])
