import { eq, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { buildSlug as slugify, changeStatus, createDraft, deleteBuild, editorBuild, updateBuild } from '../../server/services/build-editor'
import { listOwnBuilds } from '../../server/services/shops'
import { savePull } from '../../server/services/evidence-uploads'
import { addPhoto } from '../../server/services/build-photos'
import { getPublishedBuild } from '../../server/services/builds'
import type { Database } from '../../server/database/types'
import { displacementCi } from '../../shared/engine'
import { partsTotalCents } from '../../shared/schemas/build'
import { schema, testDb } from '../support/context'
import { buildIds, COMPLETE_COMBINATION, inventedPullCsv, pullMeta, removeBuildsSince, storedKeys, testUploadStore, twoShops } from '../support/builds'

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

const row = async (id: number) => (await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id)))[0]
const pullFile = (seed: number) => ({ bytes: Buffer.from(inventedPullCsv(seed)), name: `pull-${seed}.csv` })
// A 1×1 PNG (the format's 8-byte signature, IHDR, IDAT and IEND chunks).
const PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAQAAAC1HAwCAAAAC0lEQVR42mNkYAAAAAYAAjCB0C8AAAAASUVORK5CYII=', 'base64')

async function completeDraftWithPull(title: string, seed: number) {
  const id = await createDraft(db, shops.mine, title)
  await updateBuild(db, shops.mine, id, { ...COMPLETE_COMBINATION })
  await savePull(db, store, shops.mine, id, { pull: pullFile(seed), meta: pullMeta() })
  return id
}

describe('build drafts (service, real MariaDB)', () => {
  it('creates a draft with only a title: the combination columns stay NULL and its address is a private one', async () => {
    const id = await createDraft(db, shops.mine, '  Street/strip 383  ')
    const build = await row(id)
    expect(build!.status).toBe('draft')
    expect(build!.title).toBe('Street/strip 383')
    expect(build!.boreIn).toBeNull()
    expect(build!.priceCents).toBeNull()
    expect(build!.slug).toMatch(/^draft-[0-9a-f]{12}$/)
    const listed = (await listOwnBuilds(db, shops.mine.id)).find(b => b.id === id)
    expect(listed).toMatchObject({ status: 'draft', displacementCi: null, pulls: 0 })
    expect((await listOwnBuilds(db, shops.other.id)).map(b => b.id)).not.toContain(id)
  })

  it('autosaves any subset of fields and replaces the parts list in order, totals in integer cents', async () => {
    const id = await createDraft(db, shops.mine, 'Parts list draft')
    const parts = [
      { category: 'Block', part: 'Four-bolt main block, bored', partNumber: 'BLK-4030', quantity: 1, unitPriceCents: 189_900 },
      { category: 'Rotating assembly', part: 'Forged pistons', partNumber: 'PST-8', quantity: 8, unitPriceCents: 12_475 },
      { category: 'Valvetrain', part: 'Hydraulic roller lifters', partNumber: '', quantity: 16, unitPriceCents: 2_999 },
    ]
    await updateBuild(db, shops.mine, id, { boreIn: 4.03, strokeIn: 3.75, parts })
    let view = await editorBuild(db, shops.mine, id)
    expect(view.fields.boreIn).toBe(4.03)
    expect(view.fields.cylinders).toBeNull()
    expect(view.parts.map(p => p.part)).toEqual(parts.map(p => p.part))
    expect(view.parts.map(p => p.position)).toEqual([0, 1, 2])
    expect(partsTotalCents(view.parts)).toBe(189_900 + 8 * 12_475 + 16 * 2_999)

    // Reorder and remove: the list sent is the list kept.
    await updateBuild(db, shops.mine, id, { parts: [parts[2]!, parts[0]!] })
    view = await editorBuild(db, shops.mine, id)
    expect(view.parts.map(p => p.part)).toEqual([parts[2]!.part, parts[0]!.part])
    const stored = await ctx.db.select().from(schema.buildParts).where(eq(schema.buildParts.buildId, id))
    expect(stored).toHaveLength(2)

    // null clears a field.
    await updateBuild(db, shops.mine, id, { boreIn: null })
    expect((await row(id))!.boreIn).toBeNull()
  })

  it('answers 404 for another shop\'s draft and 403 for writes to its published build, writing nothing', async () => {
    const draft = await createDraft(db, shops.other, 'Someone else\'s draft')
    await expect(editorBuild(db, shops.mine, draft)).rejects.toMatchObject({ statusCode: 404 })
    await expect(updateBuild(db, shops.mine, draft, { boreIn: 4 })).rejects.toMatchObject({ statusCode: 404 })
    await expect(changeStatus(db, shops.mine, draft, 'publish')).rejects.toMatchObject({ statusCode: 404 })
    await expect(deleteBuild(db, store, shops.mine, draft)).rejects.toMatchObject({ statusCode: 404 })
    expect((await row(draft))!.boreIn).toBeNull()

    const [published] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.shopId, shops.other.id))
      .then(rows => rows.filter(r => r.status === 'published'))
    await expect(updateBuild(db, shops.mine, published!.id, { title: 'Taken over' })).rejects.toMatchObject({ statusCode: 403 })
    await expect(deleteBuild(db, store, shops.mine, published!.id)).rejects.toMatchObject({ statusCode: 403 })
    await expect(savePull(db, store, shops.mine, published!.id, { pull: pullFile(5), meta: pullMeta() })).rejects.toMatchObject({ statusCode: 403 })
    expect((await row(published!.id))!.title).toBe(published!.title)
  })
})

describe('publishing (service, real MariaDB)', () => {
  it('refuses an incomplete draft with 422 naming each missing field, and leaves it a draft', async () => {
    const id = await createDraft(db, shops.mine, 'Half done')
    await updateBuild(db, shops.mine, id, { boreIn: 4.03, strokeIn: 3.75 })
    const err = await changeStatus(db, shops.mine, id, 'publish').catch(e => e)
    expect(err.statusCode).toBe(422)
    const paths = (err.data.issues as { path: string }[]).map(i => i.path)
    expect(paths).toEqual(expect.arrayContaining(['rodLengthIn', 'cylinders', 'priceCents', 'pulls']))
    expect(paths).not.toContain('boreIn')
    expect((await row(id))!.status).toBe('draft')
  })

  it('refuses a complete combination with no pull to show', async () => {
    const id = await createDraft(db, shops.mine, 'No evidence yet')
    await updateBuild(db, shops.mine, id, { ...COMPLETE_COMBINATION })
    const err = await changeStatus(db, shops.mine, id, 'publish').catch(e => e)
    expect(err.statusCode).toBe(422)
    expect((err.data.issues as { path: string }[]).map(i => i.path)).toEqual(['pulls'])
  })

  it('refuses figures that make the engine impossible (a rod shorter than half the stroke; no room at TDC)', async () => {
    const id = await createDraft(db, shops.mine, 'Impossible combination')
    await updateBuild(db, shops.mine, id, { ...COMPLETE_COMBINATION, rodLengthIn: 3, strokeIn: 6.5, chamberCc: 10, pistonCc: -80 })
    const issues = (await editorBuild(db, shops.mine, id)).publishIssues.map(i => i.path)
    expect(issues).toEqual(expect.arrayContaining(['rodLengthIn', 'pistonCc']))
  })

  it('publishes a complete draft with a pull: the address comes from the title, the figures from the pull, and the public page shows it', async () => {
    const id = await completeDraftWithPull('Pump Gas 383 Stroker', 101)
    const result = await changeStatus(db, shops.mine, id, 'publish')
    expect(result.status).toBe('published')
    expect(result.slug).toMatch(/^pump-gas-383-stroker(-\d+)?$/)
    const build = await row(id)
    expect(build!.publishedAt).not.toBeNull()
    const [pull] = await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.buildId, id))
    expect(build!.peakHp).toBeCloseTo(pull!.summary.peakHp, 1)
    expect(build!.verifiedAt).toBeNull()
    const detail = await getPublishedBuild(db, result.slug)
    expect(detail!.displacementCi).toBeCloseTo(displacementCi(4.03, 3.75, 8), 6)
    expect(detail!.pulls.map(p => p.status)).toEqual(['submitted'])

    // Unpublishing hides it; publishing again keeps the same address and date.
    await changeStatus(db, shops.mine, id, 'unpublish')
    expect(await getPublishedBuild(db, result.slug)).toBeNull()
    const again = await changeStatus(db, shops.mine, id, 'publish')
    expect(again.slug).toBe(result.slug)
    expect((await row(id))!.publishedAt!.getTime()).toBe(build!.publishedAt!.getTime())
    await expect(changeStatus(db, shops.mine, id, 'publish')).rejects.toMatchObject({ statusCode: 409 })
  })

  it('gives a second build of the same title its own address', async () => {
    const a = await completeDraftWithPull('Twin Title Build', 102)
    const b = await completeDraftWithPull('Twin Title Build', 103)
    const first = await changeStatus(db, shops.mine, a, 'publish')
    const second = await changeStatus(db, shops.mine, b, 'publish')
    expect(first.slug).toBe(slugify('Twin Title Build'))
    expect(second.slug).toBe(`${slugify('Twin Title Build')}-2`)
  })

  it('keeps a published build complete: an edit that clears a required field is refused with 422 and not written', async () => {
    const id = await completeDraftWithPull('Stays complete', 104)
    await changeStatus(db, shops.mine, id, 'publish')
    await expect(updateBuild(db, shops.mine, id, { strokeIn: null, title: 'Renamed' })).rejects.toMatchObject({ statusCode: 422 })
    const build = await row(id)
    expect(build!.strokeIn).toBe(3.75)
    expect(build!.title).toBe('Stays complete')
  })

  it('holds the rule in the table too: MariaDB refuses a published row with a missing combination field', async () => {
    const id = await createDraft(db, shops.mine, 'Forced through')
    const err = await ctx.db.update(schema.builds).set({ status: 'published' }).where(eq(schema.builds.id, id)).catch(e => e)
    expect(String(err?.cause?.message)).toMatch(/builds_published_complete/)
    expect((await row(id))!.status).toBe('draft')
  })

  it('archives and restores; archived builds leave the public pages', async () => {
    const id = await completeDraftWithPull('Archive me', 105)
    const { slug } = await changeStatus(db, shops.mine, id, 'publish')
    await changeStatus(db, shops.mine, id, 'archive')
    expect(await getPublishedBuild(db, slug)).toBeNull()
    await expect(changeStatus(db, shops.mine, id, 'unpublish')).rejects.toMatchObject({ statusCode: 409 })
    expect((await changeStatus(db, shops.mine, id, 'restore')).status).toBe('draft')
  })
})

describe('deleting a build (service, real MariaDB)', () => {
  it('removes its parts, photos, pulls, file rows and stored files, and nothing else', async () => {
    const id = await completeDraftWithPull('Delete me whole', 106)
    await updateBuild(db, shops.mine, id, { parts: [{ category: 'Heads', part: 'Ported heads', partNumber: 'H-1', quantity: 2, unitPriceCents: 145_000 }] })
    await savePull(db, store, shops.mine, id, {
      pull: pullFile(107),
      sheet: { bytes: Buffer.from('%PDF-1.4\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n'), name: 'sheet.pdf' },
      meta: pullMeta({ label: 'Second pull' }),
    })
    await addPhoto(db, store, shops.mine, id, { file: { bytes: PNG, name: 'engine.png' }, caption: 'On the stand' })
    const pulls = await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.buildId, id))
    const photos = await ctx.db.select().from(schema.buildPhotos).where(eq(schema.buildPhotos.buildId, id))
    const fileIds = [...pulls.flatMap(p => [p.fileId, p.sheetFileId]), ...photos.map(p => p.fileId)].filter((x): x is number => x !== null)
    expect(fileIds).toHaveLength(4)
    const keys = (await ctx.db.select().from(schema.files).where(inArray(schema.files.id, fileIds))).map(f => f.storageKey)
    for (const key of keys) expect(storedKeys().has(key)).toBe(true)
    const othersBefore = storedKeys().size - keys.length

    await deleteBuild(db, store, shops.mine, id)
    expect(await row(id)).toBeUndefined()
    expect(await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.buildId, id))).toHaveLength(0)
    expect(await ctx.db.select().from(schema.buildParts).where(eq(schema.buildParts.buildId, id))).toHaveLength(0)
    expect(await ctx.db.select().from(schema.buildPhotos).where(eq(schema.buildPhotos.buildId, id))).toHaveLength(0)
    expect(await ctx.db.select().from(schema.files).where(inArray(schema.files.id, fileIds))).toHaveLength(0)
    const after = storedKeys()
    for (const key of keys) expect(after.has(key)).toBe(false)
    expect(after.size).toBe(othersBefore)
  })
})
