// Photo and pull-file writes sent at the same moment to one build by its shop, over HTTP against the
// built app and the real MariaDB: each answers its own success or a clean refusal (never a 500), and
// the rows and the stored files agree afterwards (no row without its file, no file without its row).
import { eq, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { MAX_PHOTOS } from '../../server/services/build-photos'
import { headlinePull } from '../../shared/pulls/headline'
import { freshAddress, makeAccount, signedIn, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { buildIds, COMPLETE_COMBINATION, inventedPullCsv, pullMeta, removeBuildsSince, storedKeys } from '../support/builds'

let ctx: Awaited<ReturnType<typeof testDb>>
let seeded: Set<number>
let jar: CookieJar
beforeAll(async () => {
  ctx = await testDb()
  seeded = await buildIds(ctx.db)
  // A shop of its own, so no other test's builds or limits are touched.
  const shop = await makeAccount({ role: 'builder' })
  jar = await signedIn(shop.email, shop.password)
})
afterAll(async () => {
  await removeBuildsSince(ctx.db, seeded)
  await ctx.close()
})

// A 1×1 PNG (the format's 8-byte signature, IHDR, IDAT and IEND chunks).
const PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAQAAAC1HAwCAAAAC0lEQVR42mNkYAAAAAYAAjCB0C8AAAAASUVORK5CYII=', 'base64')

const withJar = (init: RequestInit = {}): RequestInit => ({ ...init, headers: { ...(init.headers ?? {}), 'cookie': jar.header(), 'x-forwarded-for': freshAddress() } })

async function newDraft(title: string): Promise<number> {
  const res = await api('/api/me/builds', withJar({ method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ title }) }))
  expect(res.status).toBe(201)
  return res.body.id as number
}

function photoForm(caption: string): FormData {
  const form = new FormData()
  form.set('photo', new Blob([PNG], { type: 'image/png' }), 'photo.png')
  form.set('caption', caption)
  return form
}

function pullForm(seed: number): FormData {
  const form = new FormData()
  form.set('meta', JSON.stringify(pullMeta({ label: `Pull ${seed}` })))
  form.set('pull', new Blob([inventedPullCsv(seed)], { type: 'text/csv' }), `pull-${seed}.csv`)
  return form
}

/** The build's photos and pulls with their file rows, and whether each stored file is there. */
async function storedState(buildId: number) {
  const photos = await ctx.db.select().from(schema.buildPhotos).where(eq(schema.buildPhotos.buildId, buildId))
  const pulls = await ctx.db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.buildId, buildId))
  const fileIds = [...photos.map(p => p.fileId), ...pulls.map(p => p.fileId)]
  const fileRows = fileIds.length ? await ctx.db.select().from(schema.files).where(inArray(schema.files.id, fileIds)) : []
  return { photos, pulls, fileRows, keys: fileRows.map(f => f.storageKey) }
}

describe('parallel uploads to one build', () => {
  it('adds photos sent at once up to the limit, refuses the rest with 409, and stores exactly the photos kept', async () => {
    const buildId = await newDraft('Parallel photos build')
    const before = storedKeys()
    const sent = MAX_PHOTOS + 4
    const answers = await Promise.all(Array.from({ length: sent }, (_, i) =>
      api(`/api/me/builds/${buildId}/photos`, withJar({ method: 'POST', body: photoForm(`Angle ${i}`) }))))
    expect(answers.filter(a => a.status >= 500).map(a => a.body)).toEqual([])
    expect(answers.map(a => a.status).sort()).toEqual([...Array.from({ length: MAX_PHOTOS }, () => 201), ...Array.from({ length: sent - MAX_PHOTOS }, () => 409)])

    const state = await storedState(buildId)
    expect(state.photos.map(p => p.id).sort((a, b) => a - b)).toEqual(answers.filter(a => a.status === 201).map(a => a.body.id as number).sort((a, b) => a - b))
    // One position each, in a row from 0: two photos never took the same place.
    expect(state.photos.map(p => p.position).sort((a, b) => a - b)).toEqual(Array.from({ length: MAX_PHOTOS }, (_, i) => i))
    expect(state.fileRows).toHaveLength(MAX_PHOTOS)
    // The stored files added are exactly the kept photos' files: a refused upload's file was removed again.
    const added = [...storedKeys()].filter(k => !before.has(k)).sort()
    expect(added).toEqual([...state.keys].sort())
  })

  it('removes and adds photos at the same moment with no server error, and rows and files still agree', async () => {
    const buildId = await newDraft('Photos in and out build')
    for (let i = 0; i < 6; i++) expect((await api(`/api/me/builds/${buildId}/photos`, withJar({ method: 'POST', body: photoForm(`First ${i}`) }))).status).toBe(201)
    const first = await storedState(buildId)
    const before = storedKeys()
    const answers = await Promise.all([
      ...first.photos.map(p => api(`/api/me/builds/${buildId}/photos/${p.id}`, withJar({ method: 'DELETE' }))),
      ...Array.from({ length: 6 }, (_, i) => api(`/api/me/builds/${buildId}/photos`, withJar({ method: 'POST', body: photoForm(`Second ${i}`) }))),
    ])
    expect(answers.filter(a => a.status >= 300).map(a => `${a.status} ${JSON.stringify(a.body)}`)).toEqual([])
    const after = await storedState(buildId)
    expect(after.photos).toHaveLength(6)
    expect(after.photos.some(p => first.photos.some(f => f.id === p.id))).toBe(false)
    const now = storedKeys()
    for (const key of first.keys) expect(now.has(key)).toBe(false)
    for (const key of after.keys) expect(now.has(key)).toBe(true)
    expect([...now].filter(k => !before.has(k)).sort()).toEqual([...after.keys].sort())
  })

  it('saves eight pull files sent at once to one build, each as its own pull with its stored file', async () => {
    const buildId = await newDraft('Parallel pulls build')
    const patch = await api(`/api/me/builds/${buildId}`, withJar({ method: 'PATCH', headers: { 'content-type': 'application/json' }, body: JSON.stringify(COMPLETE_COMBINATION) }))
    expect(patch.status).toBeLessThan(300)
    const before = storedKeys()
    const answers = await Promise.all(Array.from({ length: 8 }, (_, i) =>
      api(`/api/me/builds/${buildId}/pulls`, withJar({ method: 'POST', body: pullForm(9100 + i) }))))
    expect(answers.map(a => `${a.status}${a.status >= 300 ? ` ${JSON.stringify(a.body)}` : ''}`)).toEqual(Array.from({ length: 8 }, () => '201'))
    const state = await storedState(buildId)
    expect(state.pulls).toHaveLength(8)
    expect(state.fileRows).toHaveLength(8)
    expect([...storedKeys()].filter(k => !before.has(k)).sort()).toEqual([...state.keys].sort())
    // The headline follows the pulls by the one rule, however the eight saves interleaved.
    const [build] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, buildId))
    expect(build!.peakHp).toBe(headlinePull(state.pulls)?.pull.summary.peakHp ?? null)
    expect(build!.peakHp).not.toBeNull()
  })
})
