import contentDisposition from 'content-disposition'
import fc from 'fast-check'
import Papa from 'papaparse'
import { describe, expect, it } from 'vitest'
import { toCsv } from '../../shared/csv'
import { ILL_FORMED_TEXT, illFormedTextPath } from '../../shared/schemas/common'
import { asciiFileName, singleLine } from '../../shared/text/plain'

describe('toCsv (OWASP "CSV Injection": prefix formula-like text with an apostrophe)', () => {
  it.each(['=1+1', '+1', '-2+3', '@SUM(A1)'])('neutralises the text cell %j with a leading apostrophe', (cell) => {
    const [row] = Papa.parse<string[]>(toCsv([[cell, 'ok']]).trimEnd(), { delimiter: ',' }).data
    expect(row).toEqual([`'${cell}`, 'ok'])
  })

  it('never touches numbers, negative ones included', () => {
    expect(toCsv([[-3, 1.5, 0, 6500]])).toBe('-3,1.5,0,6500\n')
  })

  it('turns line breaks and tabs inside a cell into spaces, so a cell never opens a row of its own', () => {
    const text = toCsv([['Baseline\r\n=HYPERLINK("x")\t@y', 1]])
    expect(text.split('\n')).toHaveLength(2)
    expect(Papa.parse<string[]>(text.trimEnd(), { delimiter: ',' }).data).toEqual([['Baseline =HYPERLINK("x") @y', '1']])
  })

  it('quotes a cell holding the delimiter (RFC 4180 §2.6), so a comma cannot start a new cell', () => {
    const text = toCsv([['# pull, =1+1']])
    expect(text).toBe('"# pull, =1+1"\n')
    expect(Papa.parse<string[]>(text.trimEnd(), { delimiter: ',' }).data).toEqual([['# pull, =1+1']])
  })

  it('keeps a row of one empty cell as a row (a quoted empty field, RFC 4180 §2.5), not an empty line readers skip', () => {
    expect(toCsv([['a'], [''], ['b']])).toBe('a\n""\nb\n')
    expect(Papa.parse<string[]>(toCsv([['']]).slice(0, -1)).data).toEqual([['']])
  })

  it('reads back as the same rows for any text, with no cell that begins a formula', () => {
    fc.assert(fc.property(fc.array(fc.array(fc.oneof(fc.string(), fc.integer()), { minLength: 1, maxLength: 4 }), { minLength: 1, maxLength: 5 }), (rows) => {
      const parsed = Papa.parse<string[]>(toCsv(rows).slice(0, -1), { delimiter: ',' }).data
      expect(parsed).toHaveLength(rows.length)
      rows.forEach((row, i) => row.forEach((cell, j) => {
        if (typeof cell === 'number') expect(parsed[i]![j]).toBe(String(cell))
        else expect(parsed[i]![j]).not.toMatch(/^[=+\-@\t\r]/)
      }))
    }))
  })
})

describe('singleLine', () => {
  it('replaces control characters, line separators and bidi overrides with single spaces', () => {
    expect(singleLine(' a\r\nb\u0000c\u2028d\u202Ee\u0085f ')).toBe('a b c d e f')
  })

  it('keeps emoji sequences (the zero-width joiner is not a control) and mends a lone surrogate', () => {
    expect(singleLine('👩‍🔧 見積')).toBe('👩‍🔧 見積')
    expect(singleLine('a\ud800b')).toBe('a\uFFFDb')
  })
})

describe('asciiFileName and the Content-Disposition it feeds', () => {
  it.each([
    ['café.pdf', 'cafe.pdf'],
    ['見積書.pdf', 'file.pdf'],
    ['🔧 dyno sheet.pdf', '_ dyno sheet.pdf'],
    ['a"b\\c.pdf', 'a_b_c.pdf'],
    ['plain-name.csv', 'plain-name.csv'],
  ])('spells %j as %j', (name, ascii) => {
    expect(asciiFileName(name)).toBe(ascii)
  })

  it('gives a header the content-disposition package parses back to the exact name (RFC 6266, RFC 8187)', () => {
    fc.assert(fc.property(fc.string({ unit: 'grapheme', minLength: 1, maxLength: 40 }), (raw) => {
      const name = `${singleLine(raw).replace(/[/\\]/g, '_') || 'file'}.pdf`
      const header = contentDisposition(name, { type: 'attachment', fallback: asciiFileName(name) })
      expect(header).toMatch(/^[\x20-\x7E]+$/)
      expect(contentDisposition.parse(header).parameters.filename).toBe(name)
    }))
  })
})

describe('illFormedTextPath (String.prototype.isWellFormed, ECMA-262 2024)', () => {
  it('finds a lone surrogate anywhere in a parsed body and names its path', () => {
    expect(illFormedTextPath({ name: 'ok', query: { q: 'pushrod \ud800', aspiration: ['na'] } })).toBe('query.q')
    expect(illFormedTextPath({ parts: [{ name: 'cam' }, { name: '\udfff' }] })).toBe('parts.1.name')
    expect(illFormedTextPath(['\udc00'])).toBe('0')
    expect(illFormedTextPath({ ['key\ud800']: 1 })).toBe('key\uFFFD')
  })

  it('passes well-formed text, surrogate pairs included, and values that are not text', () => {
    expect(illFormedTextPath({ name: '🔧 見積', n: 3, ok: true, none: null, list: ['a', 2] })).toBeNull()
    expect(illFormedTextPath('\ud83d\udd27')).toBeNull()
    expect(illFormedTextPath(undefined)).toBeNull()
  })

  it('walks a deeply nested value without exhausting the stack', () => {
    let deep: unknown = 'bad \ud800'
    for (let i = 0; i < 100_000; i++) deep = [deep]
    expect(illFormedTextPath(deep)).toMatch(/^0(\.0)*$/)
  })

  it('has a message a person can act on', () => {
    expect(ILL_FORMED_TEXT).toMatch(/retype/)
  })
})
