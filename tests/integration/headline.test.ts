// The one headline rule end to end: a pull whose own automatic check fails never sets the figure that
// search filters on, the build page headlines, or the card shows (shared/pulls/headline.ts).
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { savePull } from '../../server/services/evidence-uploads'
import { changeStatus, createDraft, updateBuild } from '../../server/services/build-editor'
import type { Database } from '../../server/database/types'
import { PERSONAS, signedIn, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { buildIds, COMPLETE_COMBINATION, inventedPullCsv, pullMeta, pullsOf, removeBuildsSince, testUploadStore, twoShops } from '../support/builds'

let ctx: Awaited<ReturnType<typeof testDb>>
let seeded: Set<number>
let db: Database
let shops: Awaited<ReturnType<typeof twoShops>>
let admin: CookieJar
const store = testUploadStore()
beforeAll(async () => {
  ctx = await testDb()
  seeded = await buildIds(ctx.db)
  db = ctx.db as unknown as Database
  shops = await twoShops(ctx.db)
  admin = await signedIn(PERSONAS.admin)
})
afterAll(async () => {
  await removeBuildsSince(ctx.db, seeded)
  await ctx.close()
})

const file = (text: string) => ({ bytes: Buffer.from(text), name: 'pull.csv' })

/** The same invented pull with its power column raised 9 % (torque untouched): the hp–torque agreement check fails. */
function inflated(text: string): string {
  return text.trim().split('\n').map((line, i) => {
    if (i === 0) return line
    const [rpm, tq, hp] = line.split(',')
    return `${rpm},${tq},${(Number(hp) * 1.09).toFixed(1)}`
  }).join('\n') + '\n'
}

async function indexed(buildId: number) {
  const res = await api('/api/testing/search/sync', { method: 'POST', headers: { 'content-type': 'application/json', 'cookie': admin.header() }, body: JSON.stringify({ buildId }) })
  expect(res.status).toBeLessThan(300)
}

describe('the headline rule across search, the build page and the card', () => {
  it('shows the passing pull, never the stronger one that failed its own check', async () => {
    const tag = Math.random().toString(36).slice(2, 8)
    const id = await createDraft(db, shops.mine, `Headline rule ${tag}`)
    await updateBuild(db, shops.mine, id, { ...COMPLETE_COMBINATION })
    const good = await savePull(db, store, shops.mine, id, { pull: file(inventedPullCsv(611, 640)), meta: pullMeta({ label: 'Passing pull' }) })
    const bad = await savePull(db, store, shops.mine, id, { pull: file(inflated(inventedPullCsv(612, 660))), meta: pullMeta({ label: 'Inflated pull' }) })
    const pulls = await pullsOf(ctx.db, id)
    const passing = pulls.find(p => p.id === good.pullId)!
    const failing = pulls.find(p => p.id === bad.pullId)!
    expect(failing.checks!.some(c => c.outcome === 'fail')).toBe(true)
    expect(passing.checks!.some(c => c.outcome === 'fail')).toBe(false)
    expect(failing.summary.peakHp).toBeGreaterThan(passing.summary.peakHp)

    await changeStatus(db, shops.mine, id, 'publish')
    await indexed(id)
    const [build] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id))
    // The stored figure (cards, the shop's figures, alerts) is the passing pull's.
    expect(build!.peakHp).toBe(passing.summary.peakHp)

    const search = await api(`/api/search?q=${encodeURIComponent(`Headline rule ${tag}`)}`)
    const hit = search.body.hits.find((h: { id: number }) => h.id === id)
    expect(hit.peakHp).toBeCloseTo(passing.summary.peakHp, 1)
    expect(hit.verified).toBe(false)
    // Filtering above the passing figure does not find the build on the failing pull's figure.
    const above = await api(`/api/search?q=${encodeURIComponent(`Headline rule ${tag}`)}&hpMin=${Math.ceil(passing.summary.peakHp + 1)}`)
    expect(above.body.hits.map((h: { id: number }) => h.id)).not.toContain(id)

    const curves = await api(`/api/builds/${build!.slug}/curves`)
    expect(curves.body.headlineId).toBe(passing.id)
    expect(curves.body.headlineBasis).toBe('awaiting')
    const detail = await api(`/api/builds/${build!.slug}`)
    expect(detail.body.peakHp).toBe(passing.summary.peakHp)
  })

  it('leaves a build whose only pull fails its checks with no headline figure at all', async () => {
    const tag = Math.random().toString(36).slice(2, 8)
    const id = await createDraft(db, shops.mine, `Only failing ${tag}`)
    await updateBuild(db, shops.mine, id, { ...COMPLETE_COMBINATION })
    await savePull(db, store, shops.mine, id, { pull: file(inflated(inventedPullCsv(613, 650))), meta: pullMeta() })
    const [build] = await ctx.db.select().from(schema.builds).where(eq(schema.builds.id, id))
    expect(build!.peakHp).toBeNull()
    expect(build!.peakTq).toBeNull()
  })
})
