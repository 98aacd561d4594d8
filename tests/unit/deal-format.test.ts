import { describe, expect, it } from 'vitest'
import { CORRECTION_STANDARDS } from '../../shared/engine/types'
import { readableDetail } from '../../utils/deal-format'

describe('history details as people read them', () => {
  it('writes every standard by its name, never its stored code', () => {
    for (const s of CORRECTION_STANDARDS) {
      const shown = readableDetail(`verified, 560.2 hp under ${s.id}`)
      expect(shown).toBe(`verified, 560.2 hp under ${s.label}`)
      expect(shown).not.toMatch(/[A-Z]+_[A-Z0-9]/)
    }
  })

  it('leaves a detail without a standard as it is', () => {
    expect(readableDetail('revision 2, $24,600.00')).toBe('revision 2, $24,600.00')
  })
})
