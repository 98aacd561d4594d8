import { readdirSync } from 'node:fs'
import { resolve } from 'node:path'
import { beforeAll, describe, expect, it } from 'vitest'
import { apiRoutes, PERSONA_NAMES, routeFor, type AccessEntry, type PersonaName } from '../support/access'
import type { CookieJar } from '../support/auth'
import { PERSONAS, signedIn } from '../support/auth'
import { api } from '../support/context'

// Every file in tests/integration/access/ adds its domain's rows; a route file under server/api
// without a row fails here, so a later route cannot skip its access check.
const accessDir = resolve(import.meta.dirname, 'access')
const files = readdirSync(accessDir).filter(f => f.endsWith('.ts')).sort()
const modules = await Promise.all(files.map(async f => ({ file: f, rows: (await import(resolve(accessDir, f)) as { default: AccessEntry[] }).default })))
const entries = modules.flatMap(({ file, rows }) => rows.map(entry => ({ ...entry, source: file })))
const routes = apiRoutes()
const WRITE = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])

const jars: Partial<Record<PersonaName, CookieJar | null>> = { anonymous: null }
beforeAll(async () => {
  for (const [persona, email] of Object.entries(PERSONAS)) jars[persona as PersonaName] = await signedIn(email)
})

function request(entry: AccessEntry, jar: CookieJar | null): RequestInit {
  const headers: Record<string, string> = jar ? { cookie: jar.header() } : {}
  if (entry.form) {
    headers['content-type'] = 'application/x-www-form-urlencoded'
    return { method: entry.method, headers, body: new URLSearchParams(entry.form).toString() }
  }
  if (entry.body !== undefined) {
    headers['content-type'] = 'application/json'
    return { method: entry.method, headers, body: JSON.stringify(entry.body) }
  }
  return { method: entry.method, headers }
}

describe('role × route matrix: the list itself', () => {
  it('finds the route files under server/api', () => {
    expect(routes.map(r => `${r.method} ${r.pattern}`)).toEqual(expect.arrayContaining(['GET /api/health', 'GET /api/builds/:slug', '* /api/auth/**', 'PATCH /api/admin/users/:id']))
  })

  it('has at least one row for every route file', () => {
    const covered = new Set(entries.map(e => routeFor(routes, e.method, e.path)?.file))
    const missing = routes.filter(r => !covered.has(r.file)).map(r => `${r.method} ${r.pattern} (server/api/${r.file})`)
    expect(missing, 'add a row for these routes to a file in tests/integration/access/').toEqual([])
  })

  it('has no row that reaches no route file', () => {
    const stray = entries.filter(e => !routeFor(routes, e.method, e.path)).map(e => `${e.method} ${e.path} (${e.source})`)
    expect(stray).toEqual([])
  })

  it('refuses anonymous writes with 401 unless a row says why the write is public', () => {
    const open = entries.filter(e => WRITE.has(e.method) && e.expect.anonymous !== 401 && !e.publicWrite).map(e => `${e.method} ${e.path}`)
    expect(open).toEqual([])
  })

  it('expects no 5xx for anyone', () => {
    const fives = entries.filter(e => Object.values(e.expect).some(s => (s ?? 0) >= 500)).map(e => `${e.method} ${e.path}`)
    expect(fives).toEqual([])
  })
})

describe.each(entries.map(e => [`${e.method} ${e.path}`, e] as const))('%s', (_name, entry) => {
  it.each(PERSONA_NAMES.map(p => [p] as const))('answers %s as the matrix says', async (persona) => {
    const wanted = persona === 'otherShop' ? (entry.expect.otherShop ?? entry.expect.shop) : entry.expect[persona]
    const res = await api(entry.path, request(entry, jars[persona] ?? null))
    expect(res.status, JSON.stringify(res.body)?.slice(0, 300)).toBe(wanted)
  })
})

describe('anonymous writes never reach a 5xx', () => {
  const writes = routes.filter(r => r.method !== 'GET')
  const samples: Record<string, string> = {}
  for (const e of entries) {
    const r = routeFor(routes, e.method, e.path)
    if (r && WRITE.has(e.method) && !samples[r.file]) samples[r.file] = e.path
  }

  it.each(writes.map(r => [`${r.method} ${r.pattern}`, r] as const))('%s refuses broken and oversized bodies without a 5xx', async (_name, route) => {
    const path = samples[route.file]!
    const method = route.method === '*' ? 'POST' : route.method
    const entry = entries.find(e => e.path === path && e.method === method)
    const bodies = ['{not json', JSON.stringify({ name: 'x'.repeat(20_000), email: 42, role: ['admin'] }), '']
    for (const body of bodies) {
      const res = await api(path, { method, headers: { 'content-type': 'application/json' }, body })
      expect(res.status, `${method} ${path} with ${body.slice(0, 20)}`).toBeLessThan(500)
      if (!entry?.publicWrite) expect(res.status).toBe(401)
    }
  })
})
