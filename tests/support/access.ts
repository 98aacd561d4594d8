import { readdirSync, statSync } from 'node:fs'
import { join, relative, resolve } from 'node:path'

/** Who the role × route matrix acts as: nobody, and one demo account per role (two shops, for owned rows). */
export const PERSONA_NAMES = ['anonymous', 'racer', 'shop', 'otherShop', 'admin'] as const
export type PersonaName = typeof PERSONA_NAMES[number]

/**
 * One row of the matrix: a request with sample parameters and the status each persona must get.
 * `otherShop` defaults to `shop`'s answer; set it where the shop owns the row.
 * A write that anonymous visitors may make (sign-up, Auth.js's own routes) names why in `publicWrite`.
 */
export interface AccessEntry {
  method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE'
  path: string
  body?: unknown
  form?: Record<string, string>
  publicWrite?: string
  expect: { anonymous: number, racer: number, shop: number, otherShop?: number, admin: number }
}

/** Helps the entry files type their rows. */
export const defineAccess = (entries: AccessEntry[]) => entries

export interface ApiRoute {
  file: string
  method: string
  pattern: string
  regex: RegExp
  statics: number
}

/** Every route file under server/api, as method and path pattern (Nitro's file naming). */
export function apiRoutes(root = resolve(import.meta.dirname, '..', '..', 'server', 'api')): ApiRoute[] {
  const files: string[] = []
  const walk = (dir: string) => {
    for (const name of readdirSync(dir).sort()) {
      const full = join(dir, name)
      if (statSync(full).isDirectory()) walk(full)
      else if (/\.(ts|js|mjs)$/.test(name)) files.push(full)
    }
  }
  walk(root)
  return files.map((full) => {
    const file = relative(root, full)
    const parts = file.replace(/\.(ts|js|mjs)$/, '').split('/')
    let last = parts.pop()!
    const m = /^(.*)\.(get|post|put|patch|delete)$/i.exec(last)
    const method = m ? m[2]!.toUpperCase() : '*'
    if (m) last = m[1]!
    if (last !== 'index') parts.push(last)
    const segments = parts.map(p => (p.startsWith('[...') ? '**' : p.startsWith('[') ? `:${p.slice(1, -1)}` : p))
    const pattern = `/api${segments.length ? `/${segments.join('/')}` : ''}`
    const source = segments.map(s => (s === '**' ? '.+' : s.startsWith(':') ? '[^/]+' : s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&'))).join('/')
    return { file, method, pattern, regex: new RegExp(`^/api${segments.length ? `/${source}` : ''}$`), statics: segments.filter(s => !s.startsWith(':') && s !== '**').length }
  })
}

/** The route file a request reaches: the most specific pattern (most fixed segments) with a matching method. */
export function routeFor(routes: ApiRoute[], method: string, path: string): ApiRoute | undefined {
  const pathname = path.split('?')[0]!
  return routes
    .filter(r => (r.method === method || r.method === '*') && r.regex.test(pathname))
    .sort((a, b) => b.statics - a.statics || (a.method === '*' ? 1 : 0) - (b.method === '*' ? 1 : 0))[0]
}
