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
])
