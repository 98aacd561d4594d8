import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { as, freshAddress, makeAccount, signIn, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'

let ctx: Awaited<ReturnType<typeof testDb>>
beforeAll(async () => {
  ctx = await testDb()
})
afterAll(async () => ctx.close())

const address = freshAddress()
function call(jar: CookieJar | null, method: string, body?: unknown) {
  const headers = as(jar, address, body === undefined ? {} : { 'content-type': 'application/json' })
  return api('/api/me/class', { method, headers, body: body === undefined ? undefined : JSON.stringify(body) })
}
async function person(role: 'racer' | 'builder' | 'admin') {
  const account = await makeAccount({ role })
  const { code, jar } = await signIn('password', { email: account.email, password: account.password })
  expect(code).toBeNull()
  return { id: account.id, jar }
}
const rowOf = async (userId: number) => (await ctx.db.select().from(schema.classRules).where(eq(schema.classRules.userId, userId)))[0]

const RULES = { className: 'Street/strip 410', displacementCapCi: 410, aspirations: ['na'], fuels: ['pump_gas', 'race_gas'], raceWeightLb: 3100, minLbPerHp: 5, transmission: 'automatic', stallRpm: 4200, shiftRpm: 6800 }

describe('GET/PUT /api/me/class', () => {
  it('keeps a racer\'s rules: none at first, saved whole, read back and replaced', async () => {
    const racer = await person('racer')
    expect((await call(racer.jar, 'GET')).body).toEqual({ rules: null })
    const saved = await call(racer.jar, 'PUT', RULES)
    expect(saved.status, JSON.stringify(saved.body)).toBe(200)
    expect(saved.body.rules).toEqual({ ...RULES, launchRpm: null })
    expect((await call(racer.jar, 'GET')).body.rules).toEqual(saved.body.rules)
    expect((await rowOf(racer.id))!.rules).toEqual(saved.body.rules)
    const replaced = await call(racer.jar, 'PUT', { displacementCapCi: 500 })
    expect(replaced.body.rules).toMatchObject({ displacementCapCi: 500, fuels: [], transmission: null, stallRpm: null })
    expect((await rowOf(racer.id))!.rules.displacementCapCi).toBe(500)
  })

  it('refuses bad input with a 400 and writes nothing', async () => {
    const racer = await person('racer')
    const bad: [unknown, string][] = [
      [{ transmission: 'manual', stallRpm: 4000 }, 'A stall speed applies to an automatic only'],
      [{ displacementCapCi: 'big' }, 'The displacement cap is a number'],
      [{ fuels: ['diesel'] }, 'Each fuel is one of'],
      [{ raceWeightLb: 3000 }, 'needs both the race weight and the minimum'],
      [{ colour: 'red' }, 'unknown field colour'],
    ]
    for (const [body, words] of bad) {
      const res = await call(racer.jar, 'PUT', body)
      expect(res.status, JSON.stringify(body)).toBe(400)
      expect(JSON.stringify(res.body)).toContain(words)
    }
    expect(await rowOf(racer.id)).toBeUndefined()
    // A refused change leaves the saved rules as they were.
    await call(racer.jar, 'PUT', RULES)
    expect((await call(racer.jar, 'PUT', { ...RULES, shiftRpm: 4250 })).status).toBe(400)
    expect((await rowOf(racer.id))!.rules.shiftRpm).toBe(6800)
  })

  it('refuses a stranger (401) and a shop or an admin (403), writing nothing', async () => {
    expect((await call(null, 'GET')).status).toBe(401)
    expect((await call(null, 'PUT', RULES)).status).toBe(401)
    for (const role of ['builder', 'admin'] as const) {
      const other = await person(role)
      expect((await call(other.jar, 'GET')).status).toBe(403)
      const res = await call(other.jar, 'PUT', RULES)
      expect(res.status).toBe(403)
      expect(res.body.message).toContain('only for racers')
      expect(await rowOf(other.id)).toBeUndefined()
    }
  })
})
