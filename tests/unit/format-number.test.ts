import { describe, expect, it } from 'vitest'
import { formatNumber } from '../../utils/format'

describe('formatNumber', () => {
  it('prints the asked number of decimals with en-US grouping, whatever was asked before', () => {
    expect(formatNumber(1041.25, 1)).toBe('1,041.3')
    expect(formatNumber(1041.25)).toBe('1,041')
    expect(formatNumber(1041.25, 2)).toBe('1,041.25')
    // The same digit count again takes the kept formatter and still answers the same.
    expect(formatNumber(7.04, 1)).toBe('7.0')
    expect(formatNumber(0.5)).toBe('1')
  })

  it('prints a dash for a missing figure', () => {
    expect(formatNumber(null)).toBe('—')
    expect(formatNumber(undefined, 1)).toBe('—')
    expect(formatNumber(Number.NaN)).toBe('—')
  })
})
