import { describe, expect, it } from 'vitest'
import { rejectEvidenceSchema, unpublishBuildSchema } from '../../shared/schemas/admin'
import { hideReviewSchema } from '../../shared/schemas/reviews'

const messageOf = (schema: { safeParse: (v: unknown) => { success: boolean, error?: { issues: { message: string }[] } } }, value: unknown) => {
  const r = schema.safeParse(value)
  expect(r.success).toBe(false)
  return r.error!.issues[0]!.message
}

describe('an admin reason speaks to whoever reads it', () => {
  it('taking a build down or refusing a pull tells the shop what to fix', () => {
    const down = messageOf(unpublishBuildSchema, { reason: 'too short' })
    expect(down).toBe('Write why the build comes down in a sentence or two (at least 10 characters), so the shop knows what to fix')
    expect(messageOf(rejectEvidenceSchema, { reason: 'bad' })).toContain('so the shop knows what to fix')
  })

  it('hiding a review speaks of the racer who wrote it, not of the shop', () => {
    const hide = messageOf(hideReviewSchema, { reason: '  short  ' })
    expect(hide).toBe('Write why the review is hidden in a sentence or two (at least 10 characters), so the racer who wrote it knows why')
    expect(hide).not.toContain('shop')
  })

  it('a reason of ten characters or more passes, trimmed', () => {
    expect(hideReviewSchema.parse({ reason: '  Names a private person.  ' }).reason).toBe('Names a private person.')
    expect(unpublishBuildSchema.parse({ reason: 'Evidence was withdrawn.' }).reason).toBe('Evidence was withdrawn.')
  })
})
