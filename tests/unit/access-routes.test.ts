import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { apiRoutes, routeFor } from '../support/access'

// The role × route matrix finds routes by walking server/api; this pins how file names become routes.
const root = mkdtempSync(join(tmpdir(), 'tw-api-'))
for (const file of ['health.get.ts', 'builds/index.get.ts', 'builds/[slug].get.ts', 'me/builds.get.ts', 'me/[thing].get.ts', 'auth/[...].ts', 'admin/users/[id].patch.ts']) {
  mkdirSync(dirname(join(root, file)), { recursive: true })
  writeFileSync(join(root, file), 'export default null\n')
}
afterAll(() => rmSync(root, { recursive: true, force: true }))

describe('apiRoutes', () => {
  const routes = apiRoutes(root)

  it('reads method and pattern from Nitro file names', () => {
    expect(routes.map(r => `${r.method} ${r.pattern}`).sort()).toEqual([
      '* /api/auth/**',
      'GET /api/builds',
      'GET /api/builds/:slug',
      'GET /api/health',
      'GET /api/me/:thing',
      'GET /api/me/builds',
      'PATCH /api/admin/users/:id',
    ])
  })

  it('sends a request to the most specific route file, by method', () => {
    expect(routeFor(routes, 'GET', '/api/me/builds')?.file).toBe('me/builds.get.ts')
    expect(routeFor(routes, 'GET', '/api/me/other')?.file).toBe('me/[thing].get.ts')
    expect(routeFor(routes, 'GET', '/api/builds?page=2')?.file).toBe('builds/index.get.ts')
    expect(routeFor(routes, 'POST', '/api/auth/callback/password')?.file).toBe('auth/[...].ts')
    expect(routeFor(routes, 'PATCH', '/api/admin/users/5')?.file).toBe('admin/users/[id].patch.ts')
    expect(routeFor(routes, 'DELETE', '/api/admin/users/5')).toBeUndefined()
    expect(routeFor(routes, 'GET', '/api/builds/a/b')).toBeUndefined()
  })
})
