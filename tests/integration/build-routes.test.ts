import { eq, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { hpToKw, peaks, convertCurve, parsePull, type CorrectionStandard } from '../../shared/engine'
import { UPLOAD_LIMITS } from '../../shared/uploads'
import { PERSONAS, signedIn, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { buildIds, COMPLETE_COMBINATION, fileRowCount, inventedPullCsv, pullMeta, removeBuildsSince, storedKeys } from '../support/builds'

let ctx: Awaited<ReturnType<typeof testDb>>
let seeded: Set<number>
const jars: Record<'shop' | 'otherShop' | 'racer' | 'admin', CookieJar> = {} as never
beforeAll(async () => {
  ctx = await testDb()
  seeded = await buildIds(ctx.db)
  for (const who of ['shop', 'otherShop', 'racer', 'admin'] as const) jars[who] = await signedIn(PERSONAS[who])
})
afterAll(async () => {
  await removeBuildsSince(ctx.db, seeded)
  await ctx.close()
})

const as = (jar: CookieJar | null, init: RequestInit = {}): RequestInit => ({ ...init, headers: { ...(init.headers ?? {}), ...(jar ? { cookie: jar.header() } : {}) } })
const sendJson = (jar: CookieJar | null, method: string, body: unknown) => as(jar, { method, headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) })

function pullForm(text: string | Blob, meta = pullMeta(), sheet?: Blob): FormData {
  const form = new FormData()
  form.set('meta', JSON.stringify(meta))
  form.set('pull', typeof text === 'string' ? new Blob([text], { type: 'text/csv' }) : text, 'pull.csv')
  if (sheet) form.set('sheet', sheet, 'sheet.pdf')
  return form
}

async function newDraft(jar = jars.shop, title = 'Route-tested build') {
  const res = await api('/api/me/builds', sendJson(jar, 'POST', { title }))
  expect(res.status).toBe(201)
  return res.body.id as number
}

async function readyDraft(title?: string) {
  const id = await newDraft(jars.shop, title)
  const res = await api(`/api/me/builds/${id}`, sendJson(jars.shop, 'PATCH', { ...COMPLETE_COMBINATION }))
  expect(res.status).toBe(200)
  return id
}

describe('the build editor over HTTP', () => {
  it('creates, autosaves and reads back a draft; the answer carries what publishing still needs', async () => {
    const id = await newDraft()
    const res = await api(`/api/me/builds/${id}`, sendJson(jars.shop, 'PATCH', {
      boreIn: 4.03, strokeIn: 3.75, cylinders: 8,
      parts: [{ category: 'Block', part: 'Four-bolt block', partNumber: 'B-1', quantity: 1, unitPriceCents: 189_900 }],
    }))
    expect(res.status).toBe(200)
    expect(res.body.fields.boreIn).toBe(4.03)
    expect(res.body.parts).toHaveLength(1)
    expect(res.body.publishIssues.map((i: { path: string }) => i.path)).toEqual(expect.arrayContaining(['rodLengthIn', 'pulls']))
  })

  it('hides a draft from everyone but its shop: 404 for another shop, 403 for other roles, 401 anonymous', async () => {
    const id = await newDraft()
    expect((await api(`/api/me/builds/${id}`, as(jars.otherShop))).status).toBe(404)
    expect((await api(`/api/me/builds/${id}`, sendJson(jars.otherShop, 'PATCH', { title: 'Mine now' }))).status).toBe(404)
    expect((await api(`/api/me/builds/${id}`, as(jars.otherShop, { method: 'DELETE' }))).status).toBe(404)
    expect((await api(`/api/me/builds/${id}/pulls`, as(jars.otherShop, { method: 'POST', body: pullForm(inventedPullCsv(301)) }))).status).toBe(404)
    expect((await api(`/api/me/builds/${id}`, as(jars.racer))).status).toBe(403)
    expect((await api(`/api/me/builds/${id}`, as(jars.admin))).status).toBe(403)
    expect((await api(`/api/me/builds/${id}`, as(null))).status).toBe(401)
    const [row] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id))
    expect(row!.title).toBe('Route-tested build')
  })

  it('answers 403 to another shop writing to a published build, and writes nothing', async () => {
    const [published] = await ctx.db.select().from(schema.builds)
      .innerJoin(schema.shops, eq(schema.shops.id, schema.builds.shopId))
      .where(eq(schema.shops.slug, 'harrow-creek-engine-works')).limit(1)
    const id = published!.builds.id
    const before = await fileRowCount(ctx.db)
    expect((await api(`/api/me/builds/${id}`, sendJson(jars.otherShop, 'PATCH', { title: 'Taken' }))).status).toBe(403)
    expect((await api(`/api/me/builds/${id}/status`, sendJson(jars.otherShop, 'POST', { action: 'archive' }))).status).toBe(403)
    expect((await api(`/api/me/builds/${id}/pulls`, as(jars.otherShop, { method: 'POST', body: pullForm(inventedPullCsv(302)) }))).status).toBe(403)
    expect((await api(`/api/me/builds/${id}`, as(jars.otherShop, { method: 'DELETE' }))).status).toBe(403)
    const [after] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id))
    expect(after!.title).toBe(published!.builds.title)
    expect(after!.status).toBe('published')
    expect(await fileRowCount(ctx.db)).toBe(before)
  })

  it('refuses bad input with a clear 400 and writes nothing', async () => {
    const id = await newDraft()
    const res = await api(`/api/me/builds/${id}`, sendJson(jars.shop, 'PATCH', { boreIn: 40.3, cylinders: 'eight' }))
    expect(res.status).toBe(400)
    expect(res.body.message).toMatch(/boreIn: Bore is between/)
    expect((await api('/api/me/builds', sendJson(jars.shop, 'POST', { title: 'x' }))).status).toBe(400)
    expect((await api(`/api/me/builds/${id}/status`, sendJson(jars.shop, 'POST', { action: 'launch' }))).status).toBe(400)
    expect((await api('/api/me/builds/not-a-number', as(jars.shop))).status).toBe(400)
    const [row] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id))
    expect(row!.boreIn).toBeNull()
  })

  it('refuses to publish an incomplete draft with 422 naming the fields', async () => {
    const id = await newDraft()
    const res = await api(`/api/me/builds/${id}/status`, sendJson(jars.shop, 'POST', { action: 'publish' }))
    expect(res.status).toBe(422)
    expect(res.body.message).toMatch(/Not ready to publish/)
    expect(res.body.data.issues.map((i: { path: string }) => i.path)).toEqual(expect.arrayContaining(['boreIn', 'summary', 'pulls']))
  })
})

describe('pull uploads over HTTP', () => {
  it('previews, saves and publishes a good pull; the public curves match convertCurve under another standard', async () => {
    const id = await readyDraft('Route upload 396')
    const text = inventedPullCsv(303)
    const preview = await api(`/api/me/builds/${id}/pulls/preview`, as(jars.shop, { method: 'POST', body: pullForm(text) }))
    expect(preview.status).toBe(200)
    expect(preview.body.checks).toHaveLength(8)
    const saved = await api(`/api/me/builds/${id}/pulls`, as(jars.shop, { method: 'POST', body: pullForm(text, pullMeta({ declaredStandard: 'DIN_70020' })) }))
    expect(saved.status).toBe(201)
    const published = await api(`/api/me/builds/${id}/status`, sendJson(jars.shop, 'POST', { action: 'publish' }))
    expect(published.status).toBe(200)

    const standard: CorrectionStandard = 'SAE_J607'
    const curves = await api(`/api/builds/${published.body.slug}/curves?standard=${standard}`)
    const parsed = parsePull(text)
    if (!parsed.ok) throw new Error('the invented pull should parse')
    const weather = pullMeta().weather
    const expected = peaks(convertCurve(parsed.points, { standard: 'DIN_70020', weather }, { standard, weather }).points)
    expect(curves.body.pulls[0].peaks.peakHp).toBeCloseTo(expected.peakHp, 1)
    expect(hpToKw(curves.body.pulls[0].peaks.peakHp)).toBeCloseTo(hpToKw(expected.peakHp), 0)
    expect(curves.body.pulls[0].status).toBe('submitted')
  })

  it('refuses an oversized upload with 413 from its declared length, storing nothing', async () => {
    const id = await readyDraft()
    const rows = await fileRowCount(ctx.db)
    const keys = storedKeys()
    const res = await api(`/api/me/builds/${id}/pulls`, as(jars.shop, { method: 'POST', body: pullForm(new Blob([Buffer.alloc(UPLOAD_LIMITS.pull + UPLOAD_LIMITS.sheet + 100_000, 'a')])) }))
    expect(res.status).toBe(413)
    expect(res.body.message).toMatch(/the most this accepts/)
    expect(await fileRowCount(ctx.db)).toBe(rows)
    expect(storedKeys()).toEqual(keys)
  })

  it('refuses a pull file over its own limit inside an allowed form with 413', async () => {
    const id = await readyDraft()
    const keys = storedKeys()
    const res = await api(`/api/me/builds/${id}/pulls`, as(jars.shop, { method: 'POST', body: pullForm(new Blob([Buffer.alloc(UPLOAD_LIMITS.pull + 10, 'a')])) }))
    expect(res.status).toBe(413)
    expect(res.body.message).toMatch(/pull file is .* MB/)
    expect(storedKeys()).toEqual(keys)
  })

  it('refuses a wrong-type file with 415 and a malformed one with 422 build rows', async () => {
    const id = await readyDraft()
    const keys = storedKeys()
    const png = new Blob([Buffer.from('89504E470D0A1A0A0000000D49484452', 'hex')])
    const wrong = await api(`/api/me/builds/${id}/pulls`, as(jars.shop, { method: 'POST', body: pullForm(png) }))
    expect(wrong.status).toBe(415)
    expect(wrong.body.message).toMatch(/image\/png/)
    const bad = await api(`/api/me/builds/${id}/pulls/preview`, as(jars.shop, { method: 'POST', body: pullForm('rpm,hp\n3000,200\n3100,abc\n3200,220\n3300,230\n') }))
    expect(bad.status).toBe(422)
    expect(bad.body.data.errors).toEqual(expect.arrayContaining([expect.objectContaining({ row: 3 })]))
    const noMeta = new FormData()
    noMeta.set('pull', new Blob([inventedPullCsv(304)]), 'pull.csv')
    expect((await api(`/api/me/builds/${id}/pulls`, as(jars.shop, { method: 'POST', body: noMeta }))).status).toBe(400)
    expect((await api(`/api/me/builds/${id}/pulls`, sendJson(jars.shop, 'POST', {}))).status).toBe(400)
    expect(storedKeys()).toEqual(keys)
  })

  it('deletes a pull and its files; deleting the build leaves no rows or files behind', async () => {
    const id = await readyDraft('Route delete')
    const saved = await api(`/api/me/builds/${id}/pulls`, as(jars.shop, { method: 'POST', body: pullForm(inventedPullCsv(305), pullMeta(), new Blob(['%PDF-1.4\n%%EOF\n'])) }))
    expect(saved.status).toBe(201)
    const [pull] = await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.id, saved.body.pullId))
    const mine = await ctx.db.select().from(schema.files).where(inArray(schema.files.id, [pull!.fileId, pull!.sheetFileId!]))
    expect(mine).toHaveLength(2)
    expect((await api(`/api/me/builds/${id}`, as(jars.shop, { method: 'DELETE' }))).status).toBe(204)
    expect(await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id))).toHaveLength(0)
    expect(await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.buildId, id))).toHaveLength(0)
    const left = storedKeys()
    for (const f of mine) {
      expect(await ctx.db.select().from(schema.files).where(eq(schema.files.id, f.id))).toHaveLength(0)
      expect(left.has(f.storageKey)).toBe(false)
    }
  })
})
