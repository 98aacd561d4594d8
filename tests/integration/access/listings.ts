import { defineAccess } from '../../support/access'

const everyone = (status: number) => ({ anonymous: status, racer: status, builder: status, admin: status })

/** The public listing routes: everyone reads them alike. */
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
  { method: 'GET', path: '/api/compare?builds=harrow-362-na-race-gas-1,harrow-519-nitrous-race-gas-2', expect: everyone(200) },
  { method: 'GET', path: '/api/compare?builds=not-a-real-build', expect: everyone(404) },
])
