// A quote's alternative combination over HTTP: stored with the revision, shown to both sides with
// its displacement computed by shared/engine (never the figure a client sends), and refused with a
// 400 naming the field when a value is out of bounds, with nothing written.
import { count, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { displacementCi } from '../../shared/engine/geometry'
import { dealTestContext, dealHttp, signedInParties, quoteInput, requestInput, schema } from '../support/deals'
import type { Database } from '../../server/database/types'

let db: Database
let close: () => Promise<void>
let jar: Awaited<ReturnType<typeof signedInParties>>
beforeAll(async () => {
  ({ db, close } = await dealTestContext())
  jar = await signedInParties(['racer', 'shop', 'otherRacer'])
})
afterAll(async () => {
  await close()
})

const { post, get } = dealHttp()
const revisions = async () => (await db.select({ n: count() }).from(schema.quoteRevisions))[0]!.n

/** An invented alternative: 4.155 in × 4.000 in × 8, inside the request's 440 ci cap. */
const alternative = {
  boreIn: 4.155,
  strokeIn: 4,
  cylinders: 8,
  cylinderHeads: 'CNC-ported aluminium, 225 cc runners',
  camIntakeDurationDeg: 248,
  camExhaustDurationDeg: 256,
  camLobeSeparationDeg: 110,
  camshaft: 'Solid roller, 0.650 in lift',
  note: 'Shorter stroke, more rpm; same budget.',
}

async function newRequest(cap: number | null = 440) {
  const res = await post('/api/requests', requestInput({ title: `Alternative ${Math.random().toString(36).slice(2, 8)}`, displacementCapCi: cap }), jar.racer)
  expect(res.status).toBe(201)
  return res.body.id as number
}

describe('an alternative combination on a quote', () => {
  it('is stored with the revision and shown to both sides, its displacement computed by shared/engine', async () => {
    const id = await newRequest()
    // A typed displacement is not part of the schema: the server never takes it.
    const sent = await post(`/api/requests/${id}/quote`, { ...quoteInput(), alternative: { ...alternative, displacementCi: 999 } }, jar.shop)
    expect(sent.status).toBe(201)
    const [row] = await db.select().from(schema.quoteRevisions).where(eq(schema.quoteRevisions.quoteId, sent.body.quoteId))
    expect(row!.alternative).toEqual(alternative)
    const expected = displacementCi(4.155, 4, 8)
    // π/4 × 4.155² × 4.000 × 8 ≈ 433.9 ci (swept volume of a cylinder, textbook geometry).
    expect(expected).toBeCloseTo(433.9, 1)
    for (const who of [jar.racer, jar.shop]) {
      const view = (await get(`/api/requests/${id}`, who)).body
      expect(view.quote.current.alternative).toEqual({ ...alternative, displacementCi: expected })
      expect(view.quote.current.lineItems).toHaveLength(4)
    }
    expect((await get(`/api/requests/${id}`, jar.otherRacer)).status).toBe(404)
  })

  it('is optional: a quote without one shows none', async () => {
    const id = await newRequest()
    expect((await post(`/api/requests/${id}/quote`, quoteInput(), jar.shop)).status).toBe(201)
    expect((await get(`/api/requests/${id}`, jar.racer)).body.quote.current.alternative).toBeNull()
  })

  it.each([
    ['a bore of 9 in', { boreIn: 9 }, 'bore'],
    ['a stroke of 0.4 in', { strokeIn: 0.4 }, 'stroke'],
    ['2.5 cylinders', { cylinders: 2.5 }, 'Cylinders'],
    ['17 cylinders', { cylinders: 17 }, 'Cylinders'],
    ['a lobe separation of 150°', { camLobeSeparationDeg: 150 }, 'lobe separation'],
    ['no cylinder heads', { cylinderHeads: '  ' }, 'cylinder heads'],
    ['a bore written as text', { boreIn: '4.155' }, 'bore'],
  ])('refuses %s with a 400 that names the field, writing nothing', async (_what, change, words) => {
    const id = await newRequest()
    const before = await revisions()
    const res = await post(`/api/requests/${id}/quote`, { ...quoteInput(), alternative: { ...alternative, ...change } }, jar.shop)
    expect(res.status).toBe(400)
    expect(JSON.stringify(res.body)).toContain(words)
    expect(await revisions()).toBe(before)
    expect(await db.select().from(schema.quotes).where(eq(schema.quotes.requestId, id))).toHaveLength(0)
  })
})
