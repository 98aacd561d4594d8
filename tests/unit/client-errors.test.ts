import { readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'

// Pages, components and composables read a failed call through apiError()/apiErrorMessage()
// (utils/api-error.ts), never by hand, and speak of an error's status and message only.
const ROOT = fileURLToPath(new URL('../../', import.meta.url))
const FOLDERS = ['pages', 'components', 'composables', 'layouts']
const BY_HAND = [/\.data\??\.message/, /\bstatusCode\b/, /\bstatusMessage\b/]

function clientFiles(): string[] {
  const found = FOLDERS.flatMap(dir => readdirSync(join(ROOT, dir), { recursive: true, encoding: 'utf8' })
    .filter(f => /\.(vue|ts)$/.test(f)).map(f => join(dir, f)))
  return [...found, 'error.vue', 'app.vue']
}

describe('client error reading', () => {
  it('the patterns catch a hand-read message and the old status names', () => {
    const hits = (line: string) => BY_HAND.some(p => p.test(line))
    expect(hits('{{ error.data?.message ?? error.message }}')).toBe(true)
    expect(hits('error.value.data.message')).toBe(true)
    expect(hits('createError({ statusCode: 404 })')).toBe(true)
    expect(hits('{{ apiErrorMessage(error) }}')).toBe(false)
  })

  it('no page, component or composable reads an error by hand', () => {
    const files = clientFiles()
    expect(files.length).toBeGreaterThan(20)
    const offenders = files.flatMap(f => readFileSync(join(ROOT, f), 'utf8').split('\n')
      .flatMap((line, i) => BY_HAND.some(p => p.test(line)) ? [`${f}:${i + 1}`] : []))
    expect(offenders).toEqual([])
  })
})
