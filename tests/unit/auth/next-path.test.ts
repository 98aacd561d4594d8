import { describe, expect, it } from 'vitest'
import { isSafeNextPath, linkRequestSchema } from '../../../shared/schemas/auth'

describe('the page to return to after sign-in', () => {
  it.each(['/deals/orders/12', '/search?ciMin=400&ciMax=450', '/'])('takes a path on this site: %s', (path) => {
    expect(isSafeNextPath(path)).toBe(true)
  })

  // Open-redirect shapes (OWASP "Unvalidated Redirects and Forwards"): scheme, protocol-relative host, backslash, control characters.
  it.each(['https://elsewhere.test/', '//elsewhere.test/x', '/\\elsewhere.test', 'deals', '/deals\nSet-Cookie: x=1', '', `/${'a'.repeat(600)}`])('refuses %j', (path) => {
    expect(isSafeNextPath(path)).toBe(false)
  })

  it('is optional on a link request and refused there with a message when foreign', () => {
    expect(linkRequestSchema.safeParse({ email: 'a@b.test' }).success).toBe(true)
    const bad = linkRequestSchema.safeParse({ email: 'a@b.test', next: 'https://elsewhere.test/' })
    expect(bad.success).toBe(false)
    expect(bad.error!.issues[0]!.message).toContain('path on this site')
  })
})
