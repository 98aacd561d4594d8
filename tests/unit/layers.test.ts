import { readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'

// The server's layers: routes call services, services call utils, and utils call neither. A util that
// imports a service (even a type) makes the lower layer depend on the upper one; move the shared piece
// down into server/utils (or shared/) instead.
const UTILS = fileURLToPath(new URL('../../server/utils/', import.meta.url))

/** Every module a file names in an import or export-from clause, types included. */
function importedModules(source: string): string[] {
  const found: string[] = []
  const pattern = /(?:^|[\s;])(?:import|export)\s[^'"`]*?from\s*['"]([^'"]+)['"]|(?:^|[\s;])import\s*\(?\s*['"]([^'"]+)['"]/gm
  for (const m of source.matchAll(pattern)) found.push(m[1] ?? m[2]!)
  return found
}

const reachesServices = (spec: string) => /(^|\/)services\//.test(spec) || spec.startsWith('~~/server/services') || spec.startsWith('~/server/services')

describe('server layers', () => {
  it('the import reader finds type imports, re-exports and dynamic imports', () => {
    const sample = [
      `import type { A } from '../services/a'`,
      `import { b,`,
      `  c } from "../services/b"`,
      `export { d } from '../services/d'`,
      `const e = await import('../services/e')`,
      `import './side-effect'`,
    ].join('\n')
    expect(importedModules(sample)).toEqual(['../services/a', '../services/b', '../services/d', '../services/e', './side-effect'])
    expect(importedModules(sample).filter(reachesServices)).toHaveLength(4)
  })

  it('no file in server/utils imports from server/services', () => {
    const files = readdirSync(UTILS, { recursive: true, encoding: 'utf8' }).filter(f => f.endsWith('.ts'))
    expect(files.length).toBeGreaterThan(5)
    const offenders = files.flatMap(f => importedModules(readFileSync(join(UTILS, f), 'utf8'))
      .filter(reachesServices).map(spec => `${f} → ${spec}`))
    expect(offenders).toEqual([])
  })
})
