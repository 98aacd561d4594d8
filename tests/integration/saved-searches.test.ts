import { randomBytes } from 'node:crypto'
import { and, eq, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { displacementCi } from '../../shared/engine/geometry'
import { MAX_SAVED_SEARCHES } from '../../shared/schemas/saved-search'
import { as, issuePaths, makeAccount, PERSONAS, signIn, signedIn, waitForMail, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { makeBuildAwaitingCheck, makeSubmittedPull } from '../support/fixtures'

let ctx: Awaited<ReturnType<typeof testDb>>
let admin: CookieJar
beforeAll(async () => {
  ctx = await testDb()
  admin = await signedIn(PERSONAS.admin)
  // The index is built at start; wait until it holds the seeded builds.
  for (let i = 0; i < 50; i++) {
    if ((await api('/api/search?perPage=1')).body?.total > 0) break
    await new Promise(r => setTimeout(r, 200))
  }
})
const people: number[] = []
afterAll(async () => {
  // This file's broad searches would otherwise match the builds later files verify.
  if (people.length) await ctx.db.delete(schema.savedSearches).where(inArray(schema.savedSearches.userId, people))
  await ctx.close()
})

interface Person { id: number, email: string, jar: CookieJar }

/** A fresh signed-in account of its own, so counts and mails of one test never meet another's. */
async function person(role: 'racer' | 'builder' = 'racer'): Promise<Person & { shopSlug: string | null }> {
  const account = await makeAccount({ role, name: `Saver ${randomBytes(2).toString('hex')}` })
  const { code, jar } = await signIn('password', { email: account.email, password: account.password })
  expect(code).toBeNull()
  people.push(account.id)
  return { id: account.id, email: account.email, jar, shopSlug: account.shopSlug }
}

const address = '10.77.0.1'
function call(jar: CookieJar | null, method: string, path: string, body?: unknown) {
  const headers = as(jar, address, body === undefined ? {} : { 'content-type': 'application/json' })
  return api(path, { method, headers, body: body === undefined ? undefined : typeof body === 'string' ? body : JSON.stringify(body) })
}
const save = (p: Person, name: string, query: Record<string, unknown>) => call(p.jar, 'POST', '/api/me/searches', { name, query })
const rowsOf = async (userId: number) => ctx.db.select().from(schema.savedSearches).where(eq(schema.savedSearches.userId, userId))
const approve = (pullId: number) => call(admin, 'POST', `/api/admin/evidence/${pullId}/approve`, {})
/** The build's announcements to the given searches (other files' and tests' searches may match it too). */
const announcementsFor = (buildId: number, searchIds: number[]) => ctx.db.select().from(schema.savedSearchAnnouncements)
  .where(and(eq(schema.savedSearchAnnouncements.buildId, buildId), inArray(schema.savedSearchAnnouncements.savedSearchId, searchIds)))
// Saved-search announcements only: a shop is also e-mailed when its own pull is verified (pull-verified:…).
const outboxTo = async (email: string) => (await ctx.db.select().from(schema.mailOutbox).where(eq(schema.mailOutbox.toAddress, email)))
  .filter(m => m.dedupeKey?.startsWith('saved-search:'))

describe('saving, build, changing and deleting a search', () => {
  it('saves the filters as the search schema reads them, counts the matches as GET /api/search does, renames, switches e-mail and deletes', async () => {
    const racer = await person()
    // The page sends its URL parameters as text; they are stored as the validated values.
    const created = await save(racer, 'Big naturally aspirated', { ciMin: '400', aspiration: ['na', 'na'], verified: 'true', q: '  pushrod ' })
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    expect(created.body).toMatchObject({ name: 'Big naturally aspirated', emailOn: true, lastNotifiedAt: null })
    expect(created.body.query).toEqual({ aspiration: ['na'], ciMin: 400, q: 'pushrod', verified: true })
    const [row] = await rowsOf(racer.id)
    expect(row!.query).toEqual({ aspiration: ['na'], ciMin: 400, q: 'pushrod', verified: true })

    // The link opens the same search, and the count is what the search route finds there.
    const direct = await api(`/api/search?${created.body.link.split('?')[1]}&perPage=1`)
    expect(direct.status).toBe(200)
    expect(created.body.link).toMatch(/^\/search\?/)
    expect(created.body.matches).toBe(direct.body.total)
    const byHand = await api('/api/search?q=pushrod&ciMin=400&aspiration=na&verified=true&perPage=1')
    expect(created.body.matches).toBe(byHand.body.total)

    const listed = await call(racer.jar, 'GET', '/api/me/searches')
    expect(listed.status).toBe(200)
    expect(listed.body.max).toBe(MAX_SAVED_SEARCHES)
    expect(listed.body.searches.map((s: { id: number }) => s.id)).toEqual([created.body.id])
    expect(listed.body.searches[0].matches).toBe(byHand.body.total)

    const renamed = await call(racer.jar, 'PATCH', `/api/me/searches/${created.body.id}`, { name: '  Four hundred plus  ' })
    expect(renamed.status).toBe(200)
    expect(renamed.body).toMatchObject({ name: 'Four hundred plus', emailOn: true })
    const quiet = await call(racer.jar, 'PATCH', `/api/me/searches/${created.body.id}`, { emailOn: false })
    expect(quiet.body).toMatchObject({ name: 'Four hundred plus', emailOn: false })
    expect((await rowsOf(racer.id))[0]).toMatchObject({ name: 'Four hundred plus', emailOn: false })

    const gone = await call(racer.jar, 'DELETE', `/api/me/searches/${created.body.id}`)
    expect(gone.status).toBe(204)
    expect(await rowsOf(racer.id)).toEqual([])
    expect((await call(racer.jar, 'GET', '/api/me/searches')).body.searches).toEqual([])
    expect((await call(racer.jar, 'DELETE', `/api/me/searches/${created.body.id}`)).status).toBe(404)
  })

  it('refuses bad input with a 400 that names the problem, and writes nothing', async () => {
    const racer = await person()
    const bad: [unknown, string][] = [
      [{}, 'name'],
      [{ name: '', query: { ciMin: 400 } }, 'Give the search a name'],
      [{ name: 'x'.repeat(81), query: { ciMin: 400 } }, 'at most 80 characters'],
      [{ name: 'Sorted', query: { ciMin: 400, sort: 'newest' } }, 'unknown parameter sort'],
      [{ name: 'Paged', query: { ciMin: 400, page: 2 } }, 'unknown parameter page'],
      [{ name: 'Backwards', query: { ciMin: 500, ciMax: 400 } }, 'ciMin is above ciMax'],
      [{ name: 'Diesel', query: { aspiration: ['diesel'] } }, 'aspiration is one of'],
      [{ name: 'Half a band', query: { ciMin: 300, bandFrom: 4000 } }, 'a band needs both'],
      [{ name: 'Everything', query: {} }, 'at least one filter'],
      [{ name: 'Extra', query: { ciMin: 300 }, owner: 1 }, 'owner'],
    ]
    for (const [body, reason] of bad) {
      const res = await call(racer.jar, 'POST', '/api/me/searches', body)
      expect(res.status, JSON.stringify(body)).toBe(400)
      expect(res.body.message, JSON.stringify(body)).toContain(reason)
    }
    expect(issuePaths((await call(racer.jar, 'POST', '/api/me/searches', { name: 'Backwards', query: { ciMin: 500, ciMax: 400 } })).body)).toContain('query.ciMin')
    expect((await call(racer.jar, 'POST', '/api/me/searches', '{not json')).status).toBe(400)
    expect(await rowsOf(racer.id)).toEqual([])

    const kept = await save(racer, 'Kept', { ciMin: 300 })
    expect(kept.status).toBe(201)
    for (const body of [{}, { emailOn: 'yes' }, { name: '' }, { name: 'Fine', query: { ciMin: 1 } }]) {
      expect((await call(racer.jar, 'PATCH', `/api/me/searches/${kept.body.id}`, body)).status, JSON.stringify(body)).toBe(400)
    }
    expect((await call(racer.jar, 'PATCH', '/api/me/searches/abc', { emailOn: false })).status).toBe(400)
    const [row] = await rowsOf(racer.id)
    expect(row).toMatchObject({ name: 'Kept', emailOn: true, query: { ciMin: 300 } })
  })

  it('keeps one account\'s searches from another (404) and from anonymous visitors (401)', async () => {
    const owner = await person()
    const stranger = await person()
    const mine = await save(owner, 'Mine', { fuel: ['e85'] })
    expect(mine.status).toBe(201)
    const id = mine.body.id as number
    expect((await call(stranger.jar, 'PATCH', `/api/me/searches/${id}`, { name: 'Taken' })).status).toBe(404)
    expect((await call(stranger.jar, 'DELETE', `/api/me/searches/${id}`)).status).toBe(404)
    expect((await call(stranger.jar, 'GET', '/api/me/searches')).body.searches).toEqual([])
    for (const [method, path, body] of [['GET', '/api/me/searches'], ['POST', '/api/me/searches', { name: 'Anon', query: { ciMin: 300 } }], ['PATCH', `/api/me/searches/${id}`, { emailOn: false }], ['DELETE', `/api/me/searches/${id}`]] as const) {
      expect((await call(null, method, path, body)).status, `${method} ${path}`).toBe(401)
    }
    expect(await rowsOf(stranger.id)).toEqual([])
    expect(await rowsOf(owner.id)).toMatchObject([{ id, name: 'Mine', emailOn: true }])
  })

  it(`keeps at most ${MAX_SAVED_SEARCHES} per account and refuses the same search twice, with 409 and nothing written`, async () => {
    const racer = await person()
    expect((await save(racer, 'First', { fuel: ['e85', 'methanol'], ciMin: 300 })).status).toBe(201)
    // The same filters in another order are the same search.
    const twice = await save(racer, 'Again', { ciMin: '300', fuel: ['methanol', 'e85'] })
    expect(twice.status).toBe(409)
    expect(twice.body.message).toContain('already saved this search as "First"')
    for (let i = 1; i < MAX_SAVED_SEARCHES; i++) expect((await save(racer, `Search ${i}`, { ciMin: 300 + i })).status).toBe(201)
    const over = await save(racer, 'One more', { ciMin: 999 })
    expect(over.status).toBe(409)
    expect(over.body.message).toContain(`${MAX_SAVED_SEARCHES} saved searches`)
    expect(await rowsOf(racer.id)).toHaveLength(MAX_SAVED_SEARCHES)
    // Broad searches like these would match every probe build below.
    await ctx.db.delete(schema.savedSearches).where(eq(schema.savedSearches.userId, racer.id))
  })
})

describe('announcing a newly verified build', () => {
  /** A published build awaiting its first check, with a word of its own in the title. */
  async function probeBuild(shopId?: number) {
    const tag = `zq${randomBytes(3).toString('hex')}`
    const build = await makeBuildAwaitingCheck(ctx.db, { title: `Probe ${tag} stroker`, shopId })
    const [row] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, build.buildId))
    const ci = displacementCi(row!.boreIn!, row!.strokeIn!, row!.cylinders!)
    const [shopRow] = await ctx.db.select().from(schema.shops).where(eq(schema.shops.id, row!.shopId))
    return { ...build, tag, ci, aspiration: row!.aspiration!, shopName: shopRow!.shopName }
  }

  it('e-mails each matching saver once with the build\'s link, records the announcement, skips a non-match, and a second verified pull sends nothing more', async () => {
    const build = await probeBuild()
    expect(build.aspiration).not.toBe('turbo')
    const saver = await person()
    const unmatched = await person()
    const quiet = await person()
    const match = await save(saver, 'Probe near this size', { q: build.tag, ciMin: Math.floor(build.ci - 1), ciMax: Math.ceil(build.ci + 1), verified: true })
    const miss = await save(unmatched, 'Probe but turbo', { q: build.tag, aspiration: ['turbo'] })
    const silent = await save(quiet, 'Probe, no mail', { q: build.tag })
    expect([match.status, miss.status, silent.status]).toEqual([201, 201, 201])
    expect((await call(quiet.jar, 'PATCH', `/api/me/searches/${silent.body.id}`, { emailOn: false })).status).toBe(200)

    const decided = await approve(build.pullId)
    expect(decided.status, JSON.stringify(decided.body)).toBe(200)
    expect(decided.body.status).toBe('verified')

    // The announcement is written before the decision answers: one row per matching search.
    const mine = [match.body.id, miss.body.id, silent.body.id]
    const rows = await announcementsFor(build.buildId, mine)
    expect(rows.map(r => ({ search: r.savedSearchId, mailed: r.mailed })).sort((a, b) => a.search - b.search))
      .toEqual([{ search: match.body.id, mailed: true }, { search: silent.body.id, mailed: false }].sort((a, b) => a.search - b.search))
    expect(await outboxTo(saver.email)).toHaveLength(1)
    expect(await outboxTo(unmatched.email)).toEqual([])
    expect(await outboxTo(quiet.email)).toEqual([])
    expect((await rowsOf(saver.id))[0]!.lastNotifiedAt).not.toBeNull()

    // Sent by the outbox's drainer through SMTP to the catcher.
    // The drainer sends every 2 s and retries a refused send after 15 s (retryDelayMs): the wait covers one retry.
    const mail = await waitForMail(saver.email, m => m.subject.includes(build.title), 30_000).catch(async (error: Error) => {
      const [row] = await outboxTo(saver.email)
      throw new Error(`${error.message}; outbox row: attempts ${row?.attempts}, sent ${row?.sentAt?.toISOString() ?? 'no'}, last error ${row?.lastError ?? 'none'}`)
    })
    expect(mail.subject).toContain('Probe near this size')
    expect(mail.text).toContain(`/builds/${build.slug}`)
    expect(mail.text).toContain('/account#saved-searches')
    expect(mail.text).toContain(build.shopName)
    expect(mail.text).toContain('SAE J1349 (2004)')
    expect(mail.text).toContain(`${(Math.round(build.ci * 10) / 10).toLocaleString('en-US', { maximumFractionDigits: 1 })} ci`)
    expect(mail.html).toContain(`/builds/${build.slug}"`)
    expect(mail.html).toContain('Manage saved searches')

    // The build now counts among the saver's matches.
    const listed = await call(saver.jar, 'GET', '/api/me/searches')
    expect(listed.body.searches[0].matches).toBe(1)

    // A second pull verified on the same build announces nothing again.
    const second = await makeSubmittedPull(ctx.db, build.slug)
    expect((await approve(second.pullId)).status).toBe(200)
    expect(await announcementsFor(build.buildId, mine)).toHaveLength(2)
    expect(await outboxTo(saver.email)).toHaveLength(1)
    expect(await outboxTo(unmatched.email)).toEqual([])
  })

  it('never announces a shop\'s own build to its owner, nor a build to a search saved after it was verified', async () => {
    const shop = await person('builder')
    const [shopRow] = await ctx.db.select().from(schema.shops).where(eq(schema.shops.slug, shop.shopSlug!))
    const build = await probeBuild(shopRow!.id)
    const racer = await person()
    const own = await save(shop, 'My own probe', { q: build.tag })
    const theirs = await save(racer, 'A probe', { q: build.tag })
    expect([own.status, theirs.status]).toEqual([201, 201])
    expect((await approve(build.pullId)).status).toBe(200)
    const rows = await announcementsFor(build.buildId, [own.body.id, theirs.body.id])
    expect(rows.map(r => r.savedSearchId)).toEqual([theirs.body.id])
    expect(await outboxTo(shop.email)).toEqual([])

    // Saved once the build was already a verified build: it was among the results when saved, so it is not new.
    const late = await person()
    const lateSearch = await save(late, 'Late probe', { q: build.tag })
    expect(lateSearch.body.matches).toBe(1)
    const second = await makeSubmittedPull(ctx.db, build.slug)
    expect((await approve(second.pullId)).status).toBe(200)
    expect((await announcementsFor(build.buildId, [own.body.id, theirs.body.id, lateSearch.body.id])).map(r => r.savedSearchId)).toEqual([theirs.body.id])
    expect(await outboxTo(late.email)).toEqual([])
  })

  it('deleting a saved search takes its announcements with it', async () => {
    const build = await probeBuild()
    const racer = await person()
    const saved = await save(racer, 'Short-lived', { q: build.tag })
    expect(saved.status, JSON.stringify(saved.body)).toBe(201)
    expect((await approve(build.pullId)).status).toBe(200)
    expect(await announcementsFor(build.buildId, [saved.body.id])).toHaveLength(1)
    expect((await call(racer.jar, 'DELETE', `/api/me/searches/${saved.body.id}`)).status).toBe(204)
    expect(await announcementsFor(build.buildId, [saved.body.id])).toEqual([])
  })
})
