/** zod 4's global settings object: zod/v4/core creates it on globalThis at first load, or adopts the one already there. */
type ZodGlobal = typeof globalThis & { __zod_globalConfig?: Record<string, unknown> }

/**
 * Turns on zod's jitless parsing for every zod build on the page without importing zod: zod 4
 * (zod/v4/core/core.js) keeps its config on globalThis.__zod_globalConfig and takes an existing one
 * as its own, so setting it before zod loads (or on the live object after) is what z.config() does.
 * tests/unit/zod-jitless.test.ts checks the pinned zod still reads it.
 */
export function setZodJitless(): void {
  const g = globalThis as ZodGlobal
  g.__zod_globalConfig = Object.assign(g.__zod_globalConfig ?? {}, { jitless: true })
}
