import { describe, expect, it } from 'vitest'
import { EMAIL_GROUPS, EMAIL_GROUP_LABELS, dealEventWords } from '../../shared/deals/notifications'
import { notificationSettingsPatch, notificationsQuery, notificationsRead } from '../../shared/schemas/notifications'

describe('the notifications schemas', () => {
  it('pages 20 at a time by default and refuses a page size outside 1–100', () => {
    expect(notificationsQuery.parse({})).toEqual({ page: 1, perPage: 20 })
    expect(notificationsQuery.parse({ page: '3', perPage: '100' })).toEqual({ page: 3, perPage: 100 })
    for (const bad of [{ perPage: '0' }, { perPage: '101' }, { page: '0' }, { page: 'x' }, { perPage: '2.5' }]) {
      expect(notificationsQuery.safeParse(bad).success, JSON.stringify(bad)).toBe(false)
    }
  })

  it('marks all or up to an event id, nothing else', () => {
    expect(notificationsRead.parse({ all: true })).toEqual({ all: true })
    expect(notificationsRead.parse({ upTo: 42 })).toEqual({ upTo: 42 })
    for (const bad of [{}, { all: false }, { upTo: 0 }, { upTo: -3 }, { all: true, upTo: 2 }, null]) {
      expect(notificationsRead.safeParse(bad).success, JSON.stringify(bad)).toBe(false)
    }
  })

  it('switches only known kinds of e-mail, at least one at a time, with true or false', () => {
    expect(notificationSettingsPatch.parse({ email: { quotes: false, messages: true } })).toEqual({ email: { quotes: false, messages: true } })
    for (const bad of [{}, { email: {} }, { email: { quotes: 'no' } }, { email: { refunds: false } }, { email: { quotes: false }, other: 1 }]) {
      expect(notificationSettingsPatch.safeParse(bad).success, JSON.stringify(bad)).toBe(false)
    }
  })

  it('labels every switch, and words an unknown action as stored rather than leave it blank', () => {
    for (const g of EMAIL_GROUPS) expect(EMAIL_GROUP_LABELS[g].label.length).toBeGreaterThan(0)
    expect(dealEventWords('milestone_funded')).toBe('Deposit paid')
    expect(dealEventWords('some_new_action')).toBe('some_new_action')
  })
})
