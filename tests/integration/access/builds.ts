import { defineAccess } from '../../support/access'

const everyone = (status: number) => ({ anonymous: status, racer: status, shop: status, admin: status })
/** A shop's own build rows: shops only; `other` is what another shop's owner gets. */
const ownerOnly = (status: number, other = status) => ({ anonymous: 401, racer: 403, shop: status, otherShop: other, admin: 403 })

/** The public build routes: everyone reads them alike. */
export default defineAccess([
  { method: 'GET', path: '/api/health', expect: everyone(200) },
  { method: 'GET', path: '/api/builds?perPage=5', expect: everyone(200) },
  { method: 'GET', path: '/api/builds?perPage=0', expect: everyone(400) },
  { method: 'GET', path: '/api/builds/no-such-build', expect: everyone(404) },
  { method: 'GET', path: '/api/builders/harrow-creek-engine-works', expect: everyone(200) },
  { method: 'GET', path: '/api/builders/Not_A_Slug', expect: everyone(400) },
  // The demo seed's first build (one pull, id 1 in the fresh test database).
  { method: 'GET', path: '/api/builds/harrow-362-na-race-gas-1/curves', expect: everyone(200) },
  { method: 'GET', path: '/api/builds/harrow-362-na-race-gas-1/curves?standard=SAE_J9999', expect: everyone(400) },
  { method: 'GET', path: '/api/builds/harrow-362-na-race-gas-1/pulls/1/curve.csv', expect: everyone(200) },
  { method: 'GET', path: '/api/builds/harrow-362-na-race-gas-1/pulls/999999/curve.csv', expect: everyone(404) },
  { method: 'GET', path: '/api/builds/harrow-362-na-race-gas-1/pulls/1/raw', expect: everyone(200) },
  { method: 'GET', path: '/api/builds/harrow-362-na-race-gas-1/pulls/999999/raw', expect: everyone(404) },
  { method: 'GET', path: '/api/compare?builds=harrow-362-na-race-gas-1,harrow-519-nitrous-race-gas-2', expect: everyone(200) },
  { method: 'GET', path: '/api/compare?builds=not-a-real-build', expect: everyone(404) },
  { method: 'GET', path: '/api/builds/harrow-362-na-race-gas-1/photos/999999', expect: everyone(404) },
  { method: 'GET', path: '/api/builds/Not_A_Slug/photos/1', expect: everyone(400) },

  // The build editor. Build 1 is the shop's published build, so another shop sees it exists
  // (403 on the owner's routes); an id nobody has answers 404. Bodies stop at validation (400), or
  // are a no-op ({} autosaves nothing), so the matrix writes nothing.
  { method: 'POST', path: '/api/me/builds', body: {}, expect: ownerOnly(400) },
  { method: 'GET', path: '/api/me/builds/1', expect: ownerOnly(200, 403) },
  { method: 'GET', path: '/api/me/builds/999999', expect: ownerOnly(404) },
  { method: 'GET', path: '/api/me/builds/not-an-id', expect: ownerOnly(400) },
  { method: 'PATCH', path: '/api/me/builds/1', body: {}, expect: ownerOnly(200, 403) },
  { method: 'PATCH', path: '/api/me/builds/999999', body: {}, expect: ownerOnly(404) },
  { method: 'DELETE', path: '/api/me/builds/999999', expect: ownerOnly(404) },
  { method: 'POST', path: '/api/me/builds/1/status', body: {}, expect: ownerOnly(400) },
  { method: 'POST', path: '/api/me/builds/999999/status', body: { action: 'publish' }, expect: ownerOnly(404) },
  { method: 'GET', path: '/api/me/builds/1/curves', expect: ownerOnly(200, 403) },
  { method: 'GET', path: '/api/me/builds/1/curves?standard=SAE_J9999', expect: ownerOnly(400) },
  { method: 'POST', path: '/api/me/builds/1/pulls/preview', body: {}, expect: ownerOnly(400, 403) },
  { method: 'POST', path: '/api/me/builds/1/pulls', body: {}, expect: ownerOnly(400, 403) },
  { method: 'POST', path: '/api/me/builds/999999/pulls', body: {}, expect: ownerOnly(404) },
  { method: 'DELETE', path: '/api/me/builds/1/pulls/999999', expect: ownerOnly(404, 403) },
  { method: 'POST', path: '/api/me/builds/1/photos', body: {}, expect: ownerOnly(400, 403) },
  { method: 'GET', path: '/api/me/builds/1/photos/999999', expect: ownerOnly(404, 403) },
  { method: 'DELETE', path: '/api/me/builds/1/photos/999999', expect: ownerOnly(404, 403) },
])
