import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { PARSE_LIMITS, classifyHeader, parsePull } from '../../../shared/engine'
import type { ParseResult } from '../../../shared/engine'
import { K_5252, inventedPull, math, rel, rng, toCsv } from './helpers'

/** Timeout for the large-file and property tests (the suite may share two cores with other work). */
const HEAVY = 60_000

function ok(result: ParseResult): Extract<ParseResult, { ok: true }> {
  if (!result.ok) throw new Error(`expected a parsed pull, got ${JSON.stringify(result.errors.slice(0, 3))}`)
  return result
}
function errors(result: ParseResult): { row: number, message: string }[] {
  if (result.ok) throw new Error('expected errors')
  return result.errors
}

describe('parsePull: well-formed files', () => {
  it('reads an imperial CSV with rpm, torque and power', () => {
    const pts = inventedPull({ stepRpm: 100 })
    const r = ok(parsePull(toCsv(pts)))
    expect(r.points).toHaveLength(pts.length)
    expect(r.points[5]!.rpm).toBe(pts[5]!.rpm)
    expect(r.points[5]!.hp).toBeCloseTo(pts[5]!.hp, 3)
    expect(r.points[5]!.lbFt).toBeCloseTo(pts[5]!.lbFt!, 3)
    expect(r.columns.delimiter).toBe(',')
    expect(r.columns.torque?.unit).toBe('lbft')
    expect(r.columns.power?.unit).toBe('hp')
  })

  it('reads a tab-separated metric file with decimal commas (N·m and kW, converted with mathjs units as reference)', () => {
    const text = 'Speed (rpm)\tTorque (N·m)\tPower (kW)\n3000\t610,5\t191,8\n3500\t625,0\t229,1\n4000\t640,25\t268,2\n'
    const r = ok(parsePull(text))
    expect(r.columns.delimiter).toBe('\t')
    expect(r.columns.decimalComma).toBe(true)
    expect(rel(r.points[0]!.lbFt!, math.unit(610.5, 'N m').toNumber('lbf ft'))).toBeLessThan(1e-9)
    expect(rel(r.points[2]!.hp, math.unit(268.2, 'kW').toNumber('hp'))).toBeLessThan(1e-9)
  })

  it('reads a semicolon file with decimal commas and power in PS (metric horsepower, 735.49875 W)', () => {
    const text = 'Drehzahl;Leistung (PS);Drehmoment (Nm)\n3000;250,5;594,6\n3200;268,0;596,4\n3400;284,4;595,7\n'
    const r = ok(parsePull(text))
    expect(r.columns.delimiter).toBe(';')
    expect(r.columns.power?.unit).toBe('ps')
    expect(rel(r.points[0]!.hp, (250.5 * 735.49875) / math.unit(1, 'hp').toNumber('W'))).toBeLessThan(1e-8)
  })

  it('computes hp from torque (hp = lb·ft × rpm / 5252.11) when the file gives torque only', () => {
    const r = ok(parsePull('RPM,TQ\n3000,400\n3500,420\n4000,430\n'))
    expect(r.columns.power).toBeNull()
    expect(r.points[1]!.hp).toBeCloseTo((420 * 3500) / K_5252, 9)
    expect(r.warnings.join(' ')).toMatch(/torque only/)
    expect(r.warnings.join(' ')).toMatch(/no unit/)
  })

  it('computes torque from hp when the file gives power only', () => {
    const r = ok(parsePull('Engine Speed,bhp\n5000,400\n5500,430\n6000,450\n'))
    expect(r.columns.torque).toBeNull()
    expect(r.points[2]!.lbFt).toBeCloseTo((450 * K_5252) / 6000, 9)
  })

  it('accepts a byte-order mark, CRLF line ends, quoted cells, blank lines and a row of units under the header', () => {
    const text = '\uFEFF"RPM","Torque","Power"\r\n"rpm","lb-ft","hp"\r\n"3000","400,5","228,8"\r\n\r\n"3500","410","273,2"\r\n"4000","415","316,1"\r\n'
    const r = ok(parsePull(text))
    expect(r.points).toHaveLength(3)
    expect(r.points[0]!.lbFt).toBeCloseTo(400.5, 9)
    expect(r.columns.torque?.unit).toBe('lbft')
  })

  it('skips title lines above the header and warns about it', () => {
    const r = ok(parsePull(`Invented Shop test cell 2\nrun 14\n${toCsv(inventedPull({ stepRpm: 500 }))}`))
    expect(r.warnings.join(' ')).toMatch(/Skipped 2 line/)
  })

  it('reads bytes as UTF-8', () => {
    const bytes = new TextEncoder().encode(toCsv(inventedPull({ stepRpm: 250 })))
    expect(ok(parsePull(bytes)).points.length).toBeGreaterThan(3)
  })
})

describe('header spellings (common practice in dyno exports)', () => {
  it.each([
    ['RPM', 'rpm'], ['Engine Speed', 'rpm'], ['Speed (rpm)', 'rpm'], ['engine_rpm', 'rpm'], ['n [1/min]', 'rpm'],
    ['Torque', 'torque'], ['TQ', 'torque'], ['lb-ft', 'torque'], ['lbft', 'torque'], ['Nm', 'torque'], ['N·m', 'torque'], ['Torque (ft-lb)', 'torque'],
    ['Power', 'power'], ['HP', 'power'], ['bhp', 'power'], ['kW', 'power'], ['PS', 'power'], ['Corrected Power (hp)', 'power'],
  ])('"%s" is read as %s', (header, kind) => {
    expect(classifyHeader(header)?.kind).toBe(kind)
  })
  it.each([['Nm', 'nm'], ['N·m', 'nm'], ['Torque (N m)', 'nm'], ['lb-ft', 'lbft'], ['Torque (lb·ft)', 'lbft']])('"%s" torque unit is %s', (h, unit) => {
    expect(classifyHeader(h)?.torqueUnit).toBe(unit)
  })
  it.each([['kW', 'kw'], ['PS', 'ps'], ['HP', 'hp'], ['Power (kW)', 'kw']])('"%s" power unit is %s', (h, unit) => {
    expect(classifyHeader(h)?.powerUnit).toBe(unit)
  })
  it.each(['Time (s)', 'Vehicle speed (mph)', 'AFR', 'Boost (psi)', ''])('"%s" is not an rpm, torque or power column', (h) => {
    expect(classifyHeader(h)).toBeNull()
  })
})

describe('parsePull: malformed files return errors and never throw', () => {
  it('empty file', () => {
    expect(errors(parsePull(''))[0]!.message).toMatch(/empty/)
    expect(errors(parsePull('  \n\n \t\n'))[0]!.message).toMatch(/empty/)
  })
  it('binary file (NUL bytes, random bytes, or text with NULs)', () => {
    const random = rng(3)
    const bytes = new Uint8Array(4096).map(() => Math.floor(random() * 256))
    bytes[10] = 0
    for (const input of [bytes, bytes.buffer, 'RPM,HP\n\u0000\u0000\u0001\u0002', new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13])]) {
      const e = errors(parsePull(input as never))
      expect(e).toHaveLength(1)
      expect(e[0]!.message).toMatch(/binary/)
    }
  })
  it('one data row', () => {
    const e = errors(parsePull('RPM,Torque,Power\n3000,400,228.5\n'))
    expect(e.some(x => /at least 3 data rows/.test(x.message))).toBe(true)
  })
  it('header only, and no recognisable header', () => {
    expect(errors(parsePull('RPM,Torque (lb-ft),Power (hp)\n'))[0]!.message).toMatch(/no data rows/)
    expect(errors(parsePull('3000,400,228\n3500,410,273\n'))[0]!.message).toMatch(/header/)
  })
  it('rpm going backwards: the row number is the file\'s, header = row 1', () => {
    const e = errors(parsePull('RPM,Torque,Power\n3000,400,228.5\n3500,410,273.2\n3400,412,266.8\n4000,415,316.1\n'))
    expect(e).toHaveLength(1)
    expect(e[0]!.row).toBe(4)
    expect(e[0]!.message).toMatch(/backwards/)
  })
  it('text in number columns, each reported on its own row', () => {
    const e = errors(parsePull('RPM,Torque,Power\n3000,400,228.5\n3500,n/a,273.2\nfour thousand,415,316.1\n4500,420,hot\n5000,,\n'))
    expect(e.map(x => x.row)).toEqual([3, 4, 5, 6])
    expect(e[0]!.message).toMatch(/Torque "n\/a" is not a number/)
    expect(e[1]!.message).toMatch(/rpm "four thousand"/)
    expect(e[3]!.message).toMatch(/neither torque nor power/)
  })
  it('negative or zero rpm and negative power', () => {
    const e = errors(parsePull('RPM,Torque,Power\n0,400,0\n3500,410,-273.2\n4000,415,316.1\n4500,420,360\n'))
    expect(e.map(x => x.row)).toEqual([2, 3])
  })
  it('19,000 rows of mixed garbage: errors capped and counted, no throw', () => {
    const random = rng(11)
    const lines = ['RPM,Torque,Power']
    for (let i = 0; i < 19_000; i++) lines.push(random() < 0.5 ? `${3000 + i * 0.04},x${i},${i}` : `${random()},${random()}`)
    const e = errors(parsePull(lines.join('\n')))
    expect(e.length).toBe(PARSE_LIMITS.maxListedErrors + 1)
    expect(e[e.length - 1]!.message).toMatch(/more problem/)
  }, HEAVY)
  it('20,000 good rows parse (the row bound itself)', () => {
    expect(PARSE_LIMITS.maxRows).toBe(20_000)
    const lines = ['RPM,Torque (lb-ft),Power (hp)']
    for (let i = 0; i < PARSE_LIMITS.maxRows; i++) {
      const rpm = 2000 + i * 0.05
      const tq = 400 + Math.sin(i / 5000) * 30
      lines.push(`${rpm.toFixed(2)},${tq.toFixed(3)},${((tq * rpm) / K_5252).toFixed(3)}`)
    }
    expect(ok(parsePull(lines.join('\n'))).points).toHaveLength(PARSE_LIMITS.maxRows)
  }, HEAVY)
  it('more than 20,000 rows is refused with a per-file error naming the bound, even when the file holds 150,000', () => {
    const lines = ['RPM,HP']
    for (let i = 0; i < 150_000; i++) lines.push(`${1000 + i * 0.1},1`)
    const e = errors(parsePull(lines.join('\n')))
    expect(e).toHaveLength(1)
    expect(e[0]!.row).toBe(0)
    expect(e[0]!.message).toMatch(/more than 20,000 data rows/)
    const justOver = ['RPM,HP', ...Array.from({ length: PARSE_LIMITS.maxRows + 1 }, (_, i) => `${1000 + i * 0.5},1`)]
    expect(errors(parsePull(justOver.join('\n')))[0]!.message).toMatch(/more than 20,000/)
  }, HEAVY)
  it('unpaired quotes', () => {
    const e = errors(parsePull('RPM,Torque,Power\n3000,"400,228.5\n3500,410,273.2\n4000,415,316.1\n'))
    expect(e.length).toBeGreaterThan(0)
  })
  it('wrong input types from untyped callers', () => {
    for (const input of [null, undefined, 42, {}, []]) expect(parsePull(input as never).ok).toBe(false)
  })
  it('never throws on arbitrary text (property)', () => {
    fc.assert(fc.property(fc.string({ unit: 'binary', maxLength: 400 }), (s) => {
      const r = parsePull(s)
      return r.ok ? r.points.length >= 3 : r.errors.length > 0
    }), { numRuns: 200 })
  }, HEAVY)
  it('never throws on arbitrary cells under a valid header (property)', () => {
    const cell = fc.oneof(fc.double().map(String), fc.string({ maxLength: 6 }), fc.constant(''), fc.integer().map(String))
    fc.assert(fc.property(fc.array(fc.tuple(cell, cell, cell), { maxLength: 30 }), fc.constantFrom(',', ';', '\t'), (rows, d) => {
      const text = [`RPM${d}Torque${d}Power`, ...rows.map(r => r.join(d))].join('\n')
      const r = parsePull(text)
      return r.ok ? r.points.every(p => p.rpm > 0 && Number.isFinite(p.hp) && Number.isFinite(p.lbFt!)) : r.errors.every(e => e.row >= 0 && e.message.length > 0)
    }), { numRuns: 300 })
  }, HEAVY)
  it('never throws on arbitrary bytes (property)', () => {
    fc.assert(fc.property(fc.uint8Array({ maxLength: 600 }), bytes => typeof parsePull(bytes).ok === 'boolean'), { numRuns: 300 })
  }, HEAVY)
})
