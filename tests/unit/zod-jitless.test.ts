import { describe, expect, it } from 'vitest'
import { setZodJitless } from '../../utils/zod-jitless'

describe('setZodJitless', () => {
  it('is the setting zod itself reads: z.config() reports jitless, set before zod loads', async () => {
    expect((globalThis as { __zod_globalConfig?: unknown }).__zod_globalConfig).toBeUndefined()
    setZodJitless()
    const { z } = await import('zod')
    expect(z.config().jitless).toBe(true)
    // And the same live object: a schema parses with it on.
    expect(z.object({ a: z.number() }).safeParse({ a: 1 }).success).toBe(true)
  })

  it('keeps settings already made on the live object', async () => {
    const { z } = await import('zod')
    z.config({ customError: () => 'kept' })
    setZodJitless()
    expect(z.config().jitless).toBe(true)
    expect(z.config().customError).toBeDefined()
    z.config({ customError: undefined })
  })
})
