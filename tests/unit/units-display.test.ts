import { describe, expect, it } from 'vitest'
import { firstFreeSlug, slugify } from '../../shared/text/slug'
import { toDisplay, unitLabel } from '../../shared/units/display'

describe('figures in the viewer\'s units (factors from NIST SP 811, Appendix B)', () => {
  it('leaves imperial figures as stored', () => {
    expect(toDisplay('power', 512.3, 'imperial', 1)).toEqual({ value: 512.3, unit: 'hp', digits: 1 })
    expect(toDisplay('torque', 480, 'imperial')).toEqual({ value: 480, unit: 'lb·ft', digits: 0 })
    expect(toDisplay('displacement', 350, 'imperial')).toEqual({ value: 350, unit: 'ci', digits: 0 })
  })

  it('1 hp (550 ft·lbf/s) = 0.745699872 kW (NIST SP 811 B.8)', () => {
    expect(toDisplay('power', 1, 'metric').value).toBeCloseTo(0.745699872, 9)
    expect(toDisplay('power', 600, 'metric')).toMatchObject({ unit: 'kW' })
    expect(toDisplay('power', 600, 'metric').value).toBeCloseTo(447.42, 2)
  })

  it('1 lbf·ft = 1.355818 N·m (NIST SP 811 B.8)', () => {
    expect(toDisplay('torque', 1, 'metric').value).toBeCloseTo(1.3558179483, 10)
    expect(toDisplay('torque', 1, 'metric').unit).toBe('N·m')
  })

  it('1 in³ = 0.016387064 L exactly (NIST SP 811 B.8), shown with two more decimals', () => {
    expect(toDisplay('displacement', 1, 'metric').value).toBeCloseTo(0.016387064, 12)
    expect(toDisplay('displacement', 350, 'metric', 1)).toMatchObject({ unit: 'L', digits: 3 })
    expect(toDisplay('displacement', 350, 'metric').value).toBeCloseTo(5.7355, 4)
  })

  it('1 in = 25.4 mm exactly (NIST SP 811 B.8), shown with one decimal fewer', () => {
    expect(toDisplay('length', 4.03, 'metric', 3)).toMatchObject({ unit: 'mm', digits: 2 })
    expect(toDisplay('length', 4.03, 'metric').value).toBeCloseTo(102.362, 6)
  })

  it('1 hp/in³ = 45.505 kW/L (0.745699872 kW over 0.016387064 L, NIST SP 811 B.8)', () => {
    expect(toDisplay('specificPower', 1, 'metric', 2)).toMatchObject({ unit: 'kW/L', digits: 1 })
    expect(toDisplay('specificPower', 1, 'metric').value).toBeCloseTo(0.745699872 / 0.016387064, 6)
    expect(toDisplay('specificPower', 1.5, 'imperial', 2)).toEqual({ value: 1.5, unit: 'hp/ci', digits: 2 })
  })

  it('weather: 1 inHg (32 °F) = 3.386389 kPa and t/°C = (t/°F − 32)/1.8 (NIST SP 811 B.8)', () => {
    expect(toDisplay('pressure', 29.92, 'metric', 2)).toMatchObject({ unit: 'kPa', digits: 2 })
    expect(toDisplay('pressure', 29.92, 'metric').value).toBeCloseTo(101.32076, 4)
    expect(toDisplay('temperature', 77, 'metric', 1)).toEqual({ value: 25, unit: '°C', digits: 1 })
    expect(toDisplay('temperature', 60, 'imperial', 1)).toEqual({ value: 60, unit: '°F', digits: 1 })
  })

  it('labels units per system', () => {
    expect([unitLabel('power', 'metric'), unitLabel('torque', 'imperial')]).toEqual(['kW', 'lb·ft'])
  })
})

describe('shop slugs', () => {
  it.each([
    ['Harrow Creek Engine Works', 'harrow-creek-engine-works'],
    ['Brightwater Dyno & Machine', 'brightwater-dyno-and-machine'],
    ['  Ironvale Cylinder Co.  ', 'ironvale-cylinder-co'],
    ['Ölberg Motorenbau', 'olberg-motorenbau'],
    ['***', ''],
  ])('%j → %j', (name, slug) => {
    expect(slugify(name)).toBe(slug)
  })

  it('caps the length without a trailing hyphen', () => {
    const s = slugify('word '.repeat(60), 20)
    expect(s.length).toBeLessThanOrEqual(20)
    expect(s.endsWith('-')).toBe(false)
  })

  it('takes the first free of base, base-2, base-3…', () => {
    expect(firstFreeSlug('shop', new Set())).toBe('shop')
    expect(firstFreeSlug('shop', new Set(['shop', 'shop-2', 'shop-4']))).toBe('shop-3')
  })
})
