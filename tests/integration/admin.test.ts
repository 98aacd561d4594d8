import { execFile } from 'node:child_process'
import { resolve } from 'node:path'
import { promisify } from 'node:util'
import { and, desc, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { freshAddress, json, makeAccount, PERSONAS, session, signedIn, signIn, uniqueEmail, type CookieJar } from '../support/auth'
import { api, baseUrl, mailFor, schema, testDb } from '../support/context'

let ctx: Awaited<ReturnType<typeof testDb>>
let admin: CookieJar
beforeAll(async () => {
  ctx = await testDb()
  admin = await signedIn(PERSONAS.admin)
})
afterAll(async () => {
  await ctx.close()
})

const patchUser = (id: number, body: unknown, jar = admin) => api(`/api/admin/users/${id}`, json('PATCH', body, jar, freshAddress()))
const audits = (id: number) => ctx.db.select().from(schema.auditLog).where(and(eq(schema.auditLog.entityType, 'user'), eq(schema.auditLog.entityId, id))).orderBy(desc(schema.auditLog.id))

describe('suspending an account', () => {
  it('ends the open session on its next request, refuses sign-in and links, and a restore undoes it', async () => {
    const account = await makeAccount({ role: 'builder' })
    const { jar } = await signIn('password', { email: account.email, password: account.password })
    expect((await api('/api/me/builds', { headers: { cookie: jar.header() } })).status).toBe(200)

    const res = await patchUser(account.id, { suspended: true })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ id: account.id, suspended: true })

    const after = await api('/api/me/builds', { headers: { cookie: jar.header() } })
    expect(after.status).toBe(401)
    expect(after.body.message).toContain('suspended')
    expect(await session(jar)).toBeNull()
    expect((await signIn('password', { email: account.email, password: account.password })).code).toBe('suspended')
    expect((await signIn('password', { email: account.email, password: 'wrong password' })).code).toBe('invalid')
    expect((await api('/api/account/sign-in-link', json('POST', { email: account.email }, null, freshAddress()))).status).toBe(202)
    // A link e-mail is only ever sent with a new token row; none was made.
    expect(await ctx.db.select().from(schema.authTokens).where(eq(schema.authTokens.userId, account.id))).toEqual([])
    expect(await mailFor(account.email)).toEqual([])

    const [entry] = await audits(account.id)
    const [adminRow] = await ctx.db.select().from(schema.users).where(eq(schema.users.email, PERSONAS.admin))
    expect(entry).toMatchObject({ action: 'account.suspend', actorId: adminRow!.id, before: { suspendedAt: null }, note: account.email })
    expect(entry!.after!.suspendedAt).toBe((await ctx.db.select().from(schema.users).where(eq(schema.users.id, account.id)))[0]!.suspendedAt!.toISOString())

    expect((await patchUser(account.id, { suspended: false })).body.suspended).toBe(false)
    expect((await signIn('password', { email: account.email, password: account.password })).code).toBeNull()
    expect((await audits(account.id))[0]!.action).toBe('account.restore')
  })

  it('keeps a cookie from before a suspension refused after the restore; a sign-in after the restore works', async () => {
    const account = await makeAccount({ role: 'racer' })
    const { jar: before } = await signIn('password', { email: account.email, password: account.password })
    expect((await api('/api/me', { headers: { cookie: before.header() } })).status).toBe(200)

    expect((await patchUser(account.id, { suspended: true })).status).toBe(200)
    expect((await patchUser(account.id, { suspended: false })).body.suspended).toBe(false)

    const stale = await api('/api/me', { headers: { cookie: before.header() } })
    expect(stale.status).toBe(401)
    expect(stale.body.message).toContain('signed out')
    expect(await session(before)).toBeNull()
    const { code, jar: after } = await signIn('password', { email: account.email, password: account.password })
    expect(code).toBeNull()
    expect((await api('/api/me', { headers: { cookie: after.header() } })).status).toBe(200)
  })

  it('does not let an admin suspend their own account', async () => {
    const me = await session(admin)
    const res = await patchUser(me!.user.id, { suspended: true })
    expect(res.status).toBe(409)
    expect((await ctx.db.select().from(schema.users).where(eq(schema.users.id, me!.user.id)))[0]!.suspendedAt).toBeNull()
  })

  it('refuses two changes at once and unknown fields with a 400', async () => {
    const account = await makeAccount({ role: 'racer' })
    const both = await patchUser(account.id, { suspended: true, role: 'admin' })
    expect(both.status).toBe(400)
    expect(both.body.message).toContain('one change at a time')
    expect((await patchUser(account.id, { role: 'builder' })).status).toBe(400)
    expect((await patchUser(account.id, { suspended: 'yes' })).status).toBe(400)
    const row = (await ctx.db.select().from(schema.users).where(eq(schema.users.id, account.id)))[0]!
    expect(row).toMatchObject({ role: 'racer', suspendedAt: null })
  })
})

describe('making admins', () => {
  it('lets an admin raise a racer to admin, with an audit row; the new role works at once', async () => {
    const account = await makeAccount({ role: 'racer' })
    const { jar } = await signIn('password', { email: account.email, password: account.password })
    expect((await api('/api/admin/users', { headers: { cookie: jar.header() } })).status).toBe(403)
    const res = await patchUser(account.id, { role: 'admin' })
    expect(res.status).toBe(200)
    expect(res.body.role).toBe('admin')
    expect((await api('/api/admin/users', { headers: { cookie: jar.header() } })).status).toBe(200)
    expect((await audits(account.id))[0]).toMatchObject({ action: 'account.make_admin', before: { role: 'racer' }, after: { role: 'admin' }, note: account.email })
  })

  it('refuses to make a shop account an admin (one role per user)', async () => {
    const account = await makeAccount({ role: 'builder' })
    const res = await patchUser(account.id, { role: 'admin' })
    expect(res.status).toBe(409)
    expect((await ctx.db.select().from(schema.users).where(eq(schema.users.id, account.id)))[0]!.role).toBe('builder')
  })

  it('lists accounts with search and a role filter', async () => {
    const all = await api('/api/admin/users?perPage=100', { headers: { cookie: admin.header() } })
    expect(all.status).toBe(200)
    expect(all.body.items.length).toBeGreaterThan(10)
    const found = await api('/api/admin/users?q=marisol', { headers: { cookie: admin.header() } })
    expect(found.body.items.map((u: { email: string }) => u.email)).toEqual([PERSONAS.shop])
    expect(found.body.items[0].shop.slug).toBe('harrow-creek-engine-works')
    const shops = await api('/api/admin/users?role=builder&perPage=100', { headers: { cookie: admin.header() } })
    expect(shops.body.items.every((u: { role: string }) => u.role === 'builder')).toBe(true)
    const literal = await api(`/api/admin/users?q=${encodeURIComponent('%')}`, { headers: { cookie: admin.header() } })
    expect(literal.body.total).toBe(0)
  })
})

describe('npm run admin:create', () => {
  const run = promisify(execFile)
  const script = (email: string) => run(resolve(import.meta.dirname, '..', '..', 'node_modules', '.bin', 'tsx'), ['scripts/admin-create.ts', email], {
    cwd: resolve(import.meta.dirname, '..', '..'),
    env: { ...process.env, NUXT_DATABASE_URL: inject('databaseUrl'), NUXT_PUBLIC_SITE_URL: baseUrl() },
  })

  it('creates an admin whose printed one-time link signs in', async () => {
    const email = uniqueEmail('new-admin')
    const { stdout } = await script(email)
    const link = /(http\S+\/sign-in\/link\?token=([A-Za-z0-9_-]{43}))/.exec(stdout)
    expect(link, stdout).not.toBeNull()
    expect(link![1]!.startsWith(baseUrl())).toBe(true)
    const row = (await ctx.db.select().from(schema.users).where(eq(schema.users.email, email)))[0]!
    expect(row).toMatchObject({ role: 'admin', passwordHash: null })
    const first = await signIn('link', { token: link![2]! })
    expect(first.code).toBeNull()
    expect((await session(first.jar))?.user.role).toBe('admin')
    expect((await signIn('link', { token: link![2]! })).code).toBe('link_invalid')
    expect((await audits(row.id))[0]).toMatchObject({ action: 'account.create_admin', actorId: null })
  })

  it('raises an existing racer, and refuses a shop with a message and a failing exit', async () => {
    const racer = await makeAccount({ role: 'racer' })
    const { stdout } = await script(racer.email)
    expect(stdout).toContain('is now an admin')
    expect((await ctx.db.select().from(schema.users).where(eq(schema.users.id, racer.id)))[0]!.role).toBe('admin')

    const shop = await makeAccount({ role: 'builder' })
    const failed = await script(shop.email).then(() => null, (err: { code: number, stderr: string }) => err)
    expect(failed?.code).toBe(1)
    expect(failed?.stderr).toContain('runs a shop')
  })

  it('refuses a malformed address', async () => {
    const failed = await script('not-an-address').then(() => null, (err: { code: number, stderr: string }) => err)
    expect(failed?.code).toBe(1)
    expect(failed?.stderr).toContain('usage')
  })
})
