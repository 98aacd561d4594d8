import { describe, expect, it } from 'vitest'
import { auditChanges, duplicateHref, formatAge, formatWhen } from '../../utils/admin-format'

describe('admin display helpers', () => {
  it('says how long something waited in minutes, hours or days', () => {
    expect(formatAge(0.01)).toBe('1 min')
    expect(formatAge(0.5)).toBe('30 min')
    expect(formatAge(26.4)).toBe('26 h')
    expect(formatAge(70)).toBe('3 days')
    expect(formatAge(null)).toBe('—')
  })

  it('writes times in UTC so every admin reads the same moment', () => {
    expect(formatWhen('2026-03-04T05:06:07.890Z')).toBe('Mar 4, 2026, 5:06 AM UTC')
    expect(formatWhen(null)).toBe('—')
  })

  it('lists only what an audit row changed, nested figures as dotted keys', () => {
    const changes = auditChanges(
      { status: 'submitted', buildId: 7, buildFigures: { peakHp: 488.4, peakTq: 409.8 } },
      { status: 'rejected', buildId: 7, buildFigures: { peakHp: null, peakTq: 409.8 }, mailed: true },
    )
    expect(changes).toEqual([
      { key: 'status', from: 'submitted', to: 'rejected' },
      { key: 'buildFigures.peakHp', from: '488.4', to: '—' },
      { key: 'mailed', from: '—', to: 'true' },
    ])
    expect(auditChanges(null, null)).toEqual([])
  })

  it('links a duplicate to its public page only while it is published', () => {
    expect(duplicateHref({ slug: 'harrow-362-na-race-gas-1', status: 'published' })).toBe('/builds/harrow-362-na-race-gas-1')
    expect(duplicateHref({ slug: 'draft-abc', status: 'draft' })).toBe('/admin/listings?q=draft-abc')
  })
})
