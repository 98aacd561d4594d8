import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { resolve } from 'node:path'
import { and, eq, ne } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { deletePull, previewPull, recheckSubmittedPulls, savePull } from '../../server/services/evidence-uploads'
import { changeStatus, createDraft, updateBuild } from '../../server/services/build-editor'
import type { UploadStore } from '../../server/utils/files'
import type { Database } from '../../server/database/types'
import { PULL_MAX_ROWS, RPM_CEILING, convertCurve, displacementCi, parsePull, peaks } from '../../shared/engine'
import { UPLOAD_LIMITS } from '../../server/utils/uploads'
import { PERSONAS, signedIn, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { buildIds, COMPLETE_COMBINATION, fileRowCount, inventedPullCsv, pullMeta, pullsOf, removeBuildsSince, storedKeys, testUploadsDir, testUploadStore, twoShops } from '../support/builds'

let ctx: Awaited<ReturnType<typeof testDb>>
let seeded: Set<number>
let db: Database
let shops: Awaited<ReturnType<typeof twoShops>>
const store = testUploadStore()
beforeAll(async () => {
  ctx = await testDb()
  seeded = await buildIds(ctx.db)
  db = ctx.db as unknown as Database
  shops = await twoShops(ctx.db)
})
afterAll(async () => {
  await removeBuildsSince(ctx.db, seeded)
  await ctx.close()
})

async function readyDraft(title: string) {
  const id = await createDraft(db, shops.mine, title)
  await updateBuild(db, shops.mine, id, { ...COMPLETE_COMBINATION })
  return id
}
const file = (text: string | Buffer, name = 'pull.csv') => ({ bytes: Buffer.isBuffer(text) ? text : Buffer.from(text), name })

/** What a service throws when it refuses (an H3 error). */
interface Refusal {
  statusCode?: number
  message: string
  data: { errors: { row: number, message: string }[] }
}

/** Runs an upload that must be refused and proves no files row and no stored file appeared. */
async function refusedWithNothingStored(run: () => Promise<unknown>, status: number): Promise<Refusal> {
  const rowsBefore = await fileRowCount(ctx.db)
  const keysBefore = storedKeys()
  const err = await run().then(() => null, (e: Refusal) => e)
  expect(err?.statusCode).toBe(status)
  expect(await fileRowCount(ctx.db)).toBe(rowsBefore)
  expect(storedKeys()).toEqual(keysBefore)
  return err!
}

describe('pull uploads (service, real MariaDB, Nitro storage on disk)', () => {
  it('stores a good pull file, hashed, with its report and a submitted status; the figures equal the engine module\'s', async () => {
    const id = await readyDraft('Good upload')
    const text = inventedPullCsv(201)
    const meta = pullMeta({ declaredStandard: 'SAE_J607', weather: { baroInHg: 28.9, airTempF: 88, humidityPct: 55 } })
    const saved = await savePull(db, store, shops.mine, id, { pull: file(text), meta })
    const [pull] = await pullsOf(ctx.db, id)
    expect(pull!.id).toBe(saved.pullId)
    expect(pull!.status).toBe('submitted')
    expect(pull!.checks!.map(c => c.id)).toContain('duplicate-curve')
    const [stored] = await ctx.db.select().from(schema.files).where(eq(schema.files.id, pull!.fileId))
    expect(stored!.sha256).toBe(createHash('sha256').update(text).digest('hex'))
    expect(stored!.kind).toBe('pull')
    expect(stored!.ownerId).toBe(shops.mine.userId)
    expect(readFileSync(resolve(testUploadsDir(), stored!.storageKey), 'utf8')).toBe(text)

    // The headline under SAE J1349 (2004), recomputed here straight from the module.
    const parsed = parsePull(text)
    if (!parsed.ok) throw new Error('the invented pull should parse')
    const expected = peaks(convertCurve(parsed.points, { standard: 'SAE_J607', weather: meta.weather }, { standard: 'SAE_J1349_2004', weather: meta.weather }).points)
    expect(pull!.summary.peakHp).toBeCloseTo(expected.peakHp, 1)
    expect(pull!.summary.peakHpRpm).toBe(expected.peakHpRpm)
    const [build] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id))
    expect(build!.peakHp).toBeCloseTo(expected.peakHp, 1)
  })

  it('previews a pull without storing anything: the curve, the warnings and the evidence report', async () => {
    const id = await readyDraft('Preview only')
    const rowsBefore = await fileRowCount(ctx.db)
    const keysBefore = storedKeys()
    const preview = await previewPull(db, shops.mine, id, { pull: file(inventedPullCsv(202)), meta: pullMeta({ declaredPeakHp: 9000 }) })
    expect(preview.points.length).toBeGreaterThan(30)
    expect(preview.summary.peakHp).toBeGreaterThan(400)
    expect(preview.checks.find(c => c.id === 'declared-peaks')!.outcome).toBe('fail')
    expect(await fileRowCount(ctx.db)).toBe(rowsBefore)
    expect(storedKeys()).toEqual(keysBefore)
    expect(await pullsOf(ctx.db, id)).toHaveLength(0)
  })

  it('refuses an oversized pull file with 413 before storing anything', async () => {
    const id = await readyDraft('Oversized')
    const huge = Buffer.alloc(UPLOAD_LIMITS.pull + 1, 'a')
    const err = await refusedWithNothingStored(() => savePull(db, store, shops.mine, id, { pull: file(huge), meta: pullMeta() }), 413)
    expect(err.message).toMatch(/MB/)
    await refusedWithNothingStored(() => savePull(db, store, shops.mine, id, {
      pull: file(inventedPullCsv(203)), sheet: file(Buffer.concat([Buffer.from('%PDF-1.4\n'), Buffer.alloc(UPLOAD_LIMITS.sheet)]), 'sheet.pdf'), meta: pullMeta(),
    }), 413)
    expect(await pullsOf(ctx.db, id)).toHaveLength(0)
  })

  it('refuses a wrong-type file with 415 by its content, whatever its name says', async () => {
    const id = await readyDraft('Wrong type')
    const png = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAQAAAC1HAwCAAAAC0lEQVR42mNkYAAAAAYAAjCB0C8AAAAASUVORK5CYII=', 'base64')
    const err = await refusedWithNothingStored(() => savePull(db, store, shops.mine, id, { pull: file(png, 'pull.csv'), meta: pullMeta() }), 415)
    expect(err.message).toMatch(/CSV or tab-separated/)
    // A sheet must be an image or a PDF: plain text is refused, and the (good) pull file is not stored either.
    await refusedWithNothingStored(() => savePull(db, store, shops.mine, id, { pull: file(inventedPullCsv(204)), sheet: file('just some notes', 'sheet.pdf'), meta: pullMeta() }), 415)
    // Binary junk with a NUL byte is not text.
    await refusedWithNothingStored(() => previewPull(db, shops.mine, id, { pull: file(Buffer.from([0x72, 0x70, 0x6D, 0x00, 0x01, 0xFF])), meta: pullMeta() }), 415)
  })

  it('refuses a malformed pull with 422 and the errors by row', async () => {
    const id = await readyDraft('Malformed')
    const bad = 'rpm,torque_lbft,power_hp\n3000,400.1,228.5\n3100,four hundred,236.0\n3200,401.7,244.8\n3300,,\n3400,402.2,260.4\n'
    const err = await refusedWithNothingStored(() => savePull(db, store, shops.mine, id, { pull: file(bad), meta: pullMeta() }), 422)
    const rows = (err.data.errors as { row: number }[]).map(e => e.row)
    expect(rows).toContain(3)
    expect(err.message).toMatch(/row 3/)
    const noRpm = 'time_s,oil_pressure\n1,2\n3,4\n5,6\n'
    const err2 = await refusedWithNothingStored(() => previewPull(db, shops.mine, id, { pull: file(noRpm), meta: pullMeta() }), 422)
    expect(err2.data.errors.length).toBeGreaterThan(0)
  })

  it('refuses an empty file and a draft that lacks the figures the checks need', async () => {
    const id = await readyDraft('Empty file')
    await refusedWithNothingStored(() => savePull(db, store, shops.mine, id, { pull: file(''), meta: pullMeta() }), 422)
    const bare = await createDraft(db, shops.mine, 'No bore yet')
    const err = await refusedWithNothingStored(() => savePull(db, store, shops.mine, bare, { pull: file(inventedPullCsv(205)), meta: pullMeta() }), 422)
    expect(err.message).toMatch(/bore, stroke, cylinders and aspiration/)
  })

  it('removes the stored file when the transaction is refused (a second baseline)', async () => {
    const id = await readyDraft('Two baselines')
    await savePull(db, store, shops.mine, id, { pull: file(inventedPullCsv(206)), meta: pullMeta({ comparisonRole: 'baseline' }) })
    const err = await refusedWithNothingStored(() => savePull(db, store, shops.mine, id, { pull: file(inventedPullCsv(207)), meta: pullMeta({ comparisonRole: 'baseline' }) }), 409)
    expect(err.message).toMatch(/already has a baseline/)
    const variant = await savePull(db, store, shops.mine, id, { pull: file(inventedPullCsv(208)), meta: pullMeta({ comparisonRole: 'variant', changeKind: 'camshaft', changeNote: 'Two degrees more duration' }) })
    const [row] = await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.id, variant.pullId))
    expect(row!.changeKind).toBe('camshaft')
  })
})

describe('duplicate evidence across builds', () => {
  it('records a match when the same curve is already on another build, without an internal id in the report', async () => {
    const [other] = await ctx.db.select({ pull: schema.dynoPulls, key: schema.files.storageKey }).from(schema.dynoPulls)
      .innerJoin(schema.files, eq(schema.files.id, schema.dynoPulls.fileId))
      .innerJoin(schema.builds, eq(schema.builds.id, schema.dynoPulls.buildId))
      .where(and(eq(schema.builds.shopId, shops.other.id), eq(schema.builds.status, 'published'))).limit(1)
    const copied = readFileSync(resolve(testUploadsDir(), other!.key), 'utf8')
    const id = await readyDraft('Borrowed curve')
    const preview = await previewPull(db, shops.mine, id, { pull: file(copied), meta: pullMeta() })
    const dup = preview.checks.find(c => c.id === 'duplicate-curve')!
    expect(dup.outcome).toBe('fail')
    // The report's sentence names no internal id (the shop reads it): another build holds the curve; its figures count the matches.
    expect(dup.message).toMatch(/another build/)
    expect(dup.message).not.toContain(String(other!.pull.buildId))
    expect(dup.figures.matches).toBeGreaterThanOrEqual(1)

    const saved = await savePull(db, store, shops.mine, id, { pull: file(copied), meta: pullMeta() })
    const [row] = await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.id, saved.pullId))
    expect(row!.checks!.find(c => c.id === 'duplicate-curve')!.outcome).toBe('fail')
  })

  it('does not count the build\'s own pulls as duplicates (a re-upload to the same build)', async () => {
    const id = await readyDraft('Same build twice')
    const text = inventedPullCsv(209)
    await savePull(db, store, shops.mine, id, { pull: file(text), meta: pullMeta() })
    const preview = await previewPull(db, shops.mine, id, { pull: file(text), meta: pullMeta() })
    expect(preview.checks.find(c => c.id === 'duplicate-curve')!.outcome).not.toBe('fail')
  })
})

describe('deleting a pull', () => {
  it('removes the pull row, its file rows and stored files, and refreshes the build\'s figures', async () => {
    const id = await readyDraft('Delete a pull')
    const a = await savePull(db, store, shops.mine, id, { pull: file(inventedPullCsv(210, 480)), meta: pullMeta({ label: 'First' }) })
    const b = await savePull(db, store, shops.mine, id, {
      pull: file(inventedPullCsv(211, 610)), sheet: file(Buffer.from('%PDF-1.4\n%%EOF\n'), 'sheet.pdf'), meta: pullMeta({ label: 'Second' }),
    })
    const [second] = await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.id, b.pullId))
    const keys = (await ctx.db.select().from(schema.files).where(eq(schema.files.id, second!.fileId))).map(f => f.storageKey)
    const [sheet] = await ctx.db.select().from(schema.files).where(eq(schema.files.id, second!.sheetFileId!))
    keys.push(sheet!.storageKey)
    for (const k of keys) expect(storedKeys().has(k)).toBe(true)

    await deletePull(db, store as UploadStore, shops.mine, id, b.pullId)
    expect((await pullsOf(ctx.db, id)).map(p => p.id)).toEqual([a.pullId])
    expect(await ctx.db.select().from(schema.files).where(eq(schema.files.id, second!.fileId))).toHaveLength(0)
    expect(await ctx.db.select().from(schema.files).where(eq(schema.files.id, second!.sheetFileId!))).toHaveLength(0)
    for (const k of keys) expect(storedKeys().has(k)).toBe(false)
    const [first] = await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.id, a.pullId))
    const [build] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id))
    expect(build!.peakHp).toBeCloseTo(first!.summary.peakHp, 1)
  })

  it('keeps a published build\'s last pull (409), and answers 404 for a pull of another build', async () => {
    const id = await readyDraft('Last pull stays')
    const only = await savePull(db, store, shops.mine, id, { pull: file(inventedPullCsv(212)), meta: pullMeta() })
    await changeStatus(db, shops.mine, id, 'publish')
    await expect(deletePull(db, store, shops.mine, id, only.pullId)).rejects.toMatchObject({ statusCode: 409 })
    const [foreign] = await ctx.db.select().from(schema.dynoPulls).where(ne(schema.dynoPulls.buildId, id)).limit(1)
    await expect(deletePull(db, store, shops.mine, id, foreign!.id)).rejects.toMatchObject({ statusCode: 404 })
    expect(await pullsOf(ctx.db, id)).toHaveLength(1)
  })
})

describe('the evidence report follows the combination', () => {
  const readStored = async (key: string) => readFileSync(resolve(testUploadsDir(), key), 'utf8')
  const bmepOf = async (buildId: number) => (await pullsOf(ctx.db, buildId))[0]!.checks!.find(c => c.id === 'bmep')!

  it('re-runs the checks of a pull awaiting review after the bore and stroke change', async () => {
    const id = await readyDraft('Combination changes after the upload')
    const text = inventedPullCsv(331)
    await savePull(db, store, shops.mine, id, { pull: file(text), meta: pullMeta() })
    const before = await bmepOf(id)
    expect(before.figures!.displacementCi).toBeCloseTo(displacementCi(COMPLETE_COMBINATION.boreIn, COMPLETE_COMBINATION.strokeIn, 8), 6)

    await updateBuild(db, shops.mine, id, { boreIn: 3.5, strokeIn: 3 })
    expect(await recheckSubmittedPulls(db, id, readStored)).toBe(1)
    const after = await bmepOf(id)
    const ci = displacementCi(3.5, 3, 8)
    expect(after.figures!.displacementCi).toBeCloseTo(ci, 6)
    // BMEP = 4π·T / Vd for a four-stroke (Heywood, Internal Combustion Engine Fundamentals, eq. 2.20),
    // with lb·ft → N·m 1.355818 and in³ → m³ 1.6387064e-5 (NIST SP 811).
    const parsed = parsePull(text)
    if (!parsed.ok) throw new Error('the invented pull should parse')
    const expectedKpa = (4 * Math.PI * peaks(parsed.points).peakTq * 1.3558179483) / (ci * 1.6387064e-5) / 1000
    expect(after.figures!.bmepKpa).toBeCloseTo(expectedKpa, 0)
    expect(after.figures!.bmepKpa).toBeGreaterThan(before.figures!.bmepKpa as number)
  })

  it('re-runs the report inside the autosave itself when it is given the stored-file reader, and only for a change to a checked field', async () => {
    const id = await readyDraft('Autosave re-checks')
    await savePull(db, store, shops.mine, id, { pull: file(inventedPullCsv(333)), meta: pullMeta() })
    const before = await bmepOf(id)
    // A field the checks do not read leaves the report as it was.
    await updateBuild(db, shops.mine, id, { rodLengthIn: 6.1 }, readStored)
    expect((await bmepOf(id)).figures!.displacementCi).toBe(before.figures!.displacementCi)

    await updateBuild(db, shops.mine, id, { boreIn: 3.5, strokeIn: 3 }, readStored)
    // Swept volume π/4 · bore² · stroke · cylinders (the textbook formula, as the engine module's displacementCi computes it).
    expect((await bmepOf(id)).figures!.displacementCi).toBeCloseTo(displacementCi(3.5, 3, 8), 6)
    expect((await bmepOf(id)).figures!.displacementCi).not.toBeCloseTo(before.figures!.displacementCi as number, 1)
  })

  it('sends a verified pull back for a new check when the combination changes, and keeps it verified when the values stay the same', async () => {
    const id = await readyDraft('Verified, then re-machined')
    await savePull(db, store, shops.mine, id, { pull: file(inventedPullCsv(337)), meta: pullMeta() })
    const verifiedAt = new Date(Date.now() - 86_400_000)
    await ctx.db.update(schema.dynoPulls).set({ status: 'verified', reviewedAt: verifiedAt }).where(eq(schema.dynoPulls.buildId, id))
    await ctx.db.update(schema.builds).set({ verifiedAt }).where(eq(schema.builds.id, id))

    // An autosave that repeats the stored values changes nothing.
    await updateBuild(db, shops.mine, id, { boreIn: COMPLETE_COMBINATION.boreIn, cylinders: 8 })
    expect((await pullsOf(ctx.db, id))[0]!.status).toBe('verified')

    await updateBuild(db, shops.mine, id, { boreIn: 4.155, strokeIn: 4 })
    const [pull] = await pullsOf(ctx.db, id)
    expect(pull!.status).toBe('submitted')
    expect(pull!.reviewNote).toContain('bore, stroke changed')
    const [build] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id))
    expect(build!.verifiedAt).toBeNull()
    // Back in the queue, its report is re-run against the new combination.
    expect(await recheckSubmittedPulls(db, id, readStored)).toBe(1)
    expect((await bmepOf(id)).figures!.displacementCi).toBeCloseTo(displacementCi(4.155, 4, 8), 6)
  })
})

describe('a hostile pull file cannot hurt the server (over HTTP, real MariaDB)', () => {
  let shop: CookieJar
  beforeAll(async () => {
    shop = await signedIn(PERSONAS.shop)
  })
  const as = (init: RequestInit): RequestInit => ({ ...init, headers: { ...(init.headers ?? {}), cookie: shop.header() } })
  const form = (text: string) => {
    const data = new FormData()
    data.set('meta', JSON.stringify(pullMeta()))
    data.set('pull', new Blob([text], { type: 'text/csv' }), 'pull.csv')
    return data
  }
  async function draftOverHttp(title: string) {
    const created = await api('/api/me/builds', as({ method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ title }) }))
    expect(created.status).toBe(201)
    const id = created.body.id as number
    const patched = await api(`/api/me/builds/${id}`, as({ method: 'PATCH', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ ...COMPLETE_COMBINATION }) }))
    expect(patched.status).toBe(200)
    return id
  }
  /** Sends the file to the preview and the save route: each answers 422 with the message, nothing is stored, and the server still answers. */
  async function refusedOverHttp(id: number, text: string, message: RegExp) {
    const rowsBefore = await fileRowCount(ctx.db)
    const keysBefore = storedKeys()
    for (const path of [`/api/me/builds/${id}/pulls/preview`, `/api/me/builds/${id}/pulls`]) {
      const res = await api(path, as({ method: 'POST', body: form(text) }))
      expect(res.status, path).toBe(422)
      expect(res.body.message, path).toMatch(message)
    }
    expect(await fileRowCount(ctx.db)).toBe(rowsBefore)
    expect(storedKeys()).toEqual(keysBefore)
    expect(await pullsOf(ctx.db, id)).toHaveLength(0)
    const health = await api('/api/health')
    expect(health.status).toBe(200)
  }

  it('a 3-row file whose last rpm is 1e11 answers 422 naming the rpm ceiling, stores nothing, and the server still answers', async () => {
    const id = await draftOverHttp('Hostile rpm')
    const text = 'RPM,Torque (lb-ft),Power (hp)\n3000,400.1,228.5\n3500,410.2,273.4\n1e11,415.0,316.1\n'
    await refusedOverHttp(id, text, new RegExp(`row 4: rpm 100000000000 is above the ${RPM_CEILING.toLocaleString('en-US')} rpm ceiling`))
    // 1e8 overflowed the call stack before; it is the same refusal now.
    await refusedOverHttp(id, text.replace('1e11', '1e8'), /rpm ceiling/)
  })

  it(`a file over the ${PULL_MAX_ROWS.toLocaleString('en-US')}-row bound answers 422 naming the bound, stores nothing, and the server still answers`, async () => {
    const id = await draftOverHttp('Too many rows')
    const lines = ['RPM,Torque (lb-ft),Power (hp)']
    for (let i = 0; i <= PULL_MAX_ROWS; i++) {
      const rpm = 2000 + i * 0.25
      lines.push(`${rpm.toFixed(2)},400.0,${((400 * rpm) / 5252.113).toFixed(2)}`)
    }
    const text = lines.join('\n')
    expect(Buffer.byteLength(text)).toBeLessThan(UPLOAD_LIMITS.pull)
    await refusedOverHttp(id, text, /more than 20,000 data rows/)
  })
})
