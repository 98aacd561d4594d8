// The two kinds of upload, a build photo (multipart form) and a deal file (raw body), over HTTP
// against the built app and the real MariaDB: the same fault answers the same status from both, a
// refused file leaves nothing stored, and a file name is cleaned by the same rule.
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { UPLOAD_LIMITS } from '../../shared/uploads'
import { freshAddress, makeAccount, signedIn, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { buildIds, removeBuildsSince, storedKeys } from '../support/builds'

let ctx: Awaited<ReturnType<typeof testDb>>
let seeded: Set<number>
let jar: CookieJar
let buildId: number
beforeAll(async () => {
  ctx = await testDb()
  seeded = await buildIds(ctx.db)
  const shop = await makeAccount({ role: 'builder' })
  jar = await signedIn(shop.email, shop.password)
  const res = await api('/api/me/builds', withJar({ method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ title: 'Upload statuses build' }) }))
  expect(res.status).toBe(201)
  buildId = res.body.id
})
afterAll(async () => {
  await removeBuildsSince(ctx.db, seeded)
  await ctx.close()
})

// A 1×1 PNG (the format's 8-byte signature, IHDR, IDAT and IEND chunks).
const PNG = Buffer.from('iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAQAAAC1HAwCAAAAC0lEQVR42mNkYAAAAAYAAjCB0C8AAAAASUVORK5CYII=', 'base64')
// The first bytes of a Windows executable ("MZ"): neither an image nor text.
const BINARY = Buffer.from([0x4D, 0x5A, 0x90, 0x00, 0x03, 0x00, 0x00, 0x00, 0x04, 0x00, 0xFF, 0xFE])

const withJar = (init: RequestInit = {}): RequestInit => ({ ...init, headers: { ...(init.headers ?? {}), 'cookie': jar.header(), 'x-forwarded-for': freshAddress() } })

function asPhoto(bytes: Buffer, name: string) {
  const form = new FormData()
  form.set('photo', new Blob([new Uint8Array(bytes)], { type: 'image/png' }), name)
  return api(`/api/me/builds/${buildId}/photos`, withJar({ method: 'POST', body: form }))
}

function asDealFile(bytes: Buffer, name: string) {
  return api(`/api/attachments?kind=photo&name=${encodeURIComponent(name)}`, withJar({ method: 'POST', headers: { 'content-type': 'application/octet-stream' }, body: new Uint8Array(bytes) }))
}

describe('a build photo and a deal file answer alike', () => {
  it.each([
    ['an empty file', Buffer.alloc(0), 422],
    ['a file over the photo limit', Buffer.concat([PNG, Buffer.alloc(UPLOAD_LIMITS.photo + 1024)]), 413],
    ['a file of the wrong type', BINARY, 415],
  ])('refuses %s with the same status from both, storing nothing', async (_what, bytes, status) => {
    const before = storedKeys()
    const filesBefore = (await ctx.db.select({ id: schema.files.id }).from(schema.files)).length
    const photo = await asPhoto(bytes, 'photo.png')
    const deal = await asDealFile(bytes, 'photo.png')
    expect(photo.status, JSON.stringify(photo.body)).toBe(status)
    expect(deal.status, JSON.stringify(deal.body)).toBe(status)
    expect(typeof photo.body.message).toBe('string')
    expect(typeof deal.body.message).toBe('string')
    expect(storedKeys()).toEqual(before)
    expect((await ctx.db.select({ id: schema.files.id }).from(schema.files)).length).toBe(filesBefore)
  })

  it('keeps a name with folders in it as the same bare file name from both', async () => {
    const name = '../../shop/photo.png'
    const photo = await asPhoto(PNG, name)
    const deal = await asDealFile(PNG, name)
    expect(photo.status, JSON.stringify(photo.body)).toBe(201)
    expect(deal.status, JSON.stringify(deal.body)).toBe(201)
    const [kept] = await ctx.db.select({ name: schema.files.originalName }).from(schema.buildPhotos)
      .innerJoin(schema.files, eq(schema.files.id, schema.buildPhotos.fileId)).where(eq(schema.buildPhotos.id, photo.body.id))
    expect(kept!.name).toBe('photo.png')
    expect(deal.body.name).toBe('photo.png')
  })

  it('refuses a deal file with no name as 400, as a photo form without its file part is', async () => {
    const deal = await asDealFile(PNG, '')
    const form = new FormData()
    form.set('caption', 'no file')
    const photo = await api(`/api/me/builds/${buildId}/photos`, withJar({ method: 'POST', body: form }))
    expect(deal.status).toBe(400)
    expect(photo.status).toBe(400)
  })
})
