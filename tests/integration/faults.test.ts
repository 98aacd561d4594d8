// Honest errors: a clear 4xx for bad input (never a 5xx), downloads under any file name, CSV that a
// spreadsheet cannot run, and a 503 with Retry-After while MariaDB is away, recovering on its own.
import contentDisposition from 'content-disposition'
import { eq } from 'drizzle-orm'
import Papa from 'papaparse'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { loadConfig } from '../../scripts/lib/config'
import { startMariadb, stopMariadb } from '../../scripts/lib/mariadb'
import { as, freshAddress, makeAccount, signIn, signedIn, PERSONAS, type CookieJar } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { makeSubmittedPull } from '../support/fixtures'

let ctx: Awaited<ReturnType<typeof testDb>>
beforeAll(async () => {
  ctx = await testDb()
})
afterAll(async () => {
  await ctx.close()
})

/** A request that can never hang the file: each answer is due within ten seconds (a guard, not a measure). */
const call = (path: string, init: RequestInit = {}) => api(path, { signal: AbortSignal.timeout(10_000), ...init })

describe('text that is not well-formed Unicode', () => {
  it('refuses a lone surrogate in a saved search\'s name or words with a 400 naming the field, storing nothing', async () => {
    const account = await makeAccount({ role: 'racer' })
    const { code, jar } = await signIn('password', { email: account.email, password: account.password })
    expect(code).toBeNull()
    const address = freshAddress()
    // JSON.stringify writes a lone surrogate as the escape \ud800 (ECMA-262 well-formed JSON.stringify), as a client may send it.
    const save = (body: unknown) => call('/api/me/searches', { method: 'POST', headers: as(jar, address, { 'content-type': 'application/json' }), body: JSON.stringify(body) })

    const badName = await save({ name: 'Big block \ud800', query: { q: 'pushrod' } })
    expect(badName.status).toBe(400)
    expect(badName.body.message).toMatch(/^name: /)
    // h3 nests a failed readValidatedBody validator's error as `data` (DEVELOPERS.md, Gotchas).
    expect(badName.body.data.data.issues).toEqual([expect.objectContaining({ path: 'name' })])

    const badWords = await save({ name: 'Big block', query: { q: 'pushrod \udfff' } })
    expect(badWords.status).toBe(400)
    expect(badWords.body.message).toMatch(/^query\.q: /)

    const rows = await ctx.db.select().from(schema.savedSearches).where(eq(schema.savedSearches.userId, account.id))
    expect(rows).toEqual([])
    // The same search with sound text is saved, so the refusal above was about the text alone.
    expect((await save({ name: 'Big block', query: { q: 'pushrod' } })).status).toBe(201)
  })
})

describe('downloads under a file name in any script', () => {
  let jar: CookieJar
  const address = freshAddress()
  beforeAll(async () => {
    jar = await signedIn(PERSONAS.racer)
  })
  const pdf = Buffer.from('%PDF-1.4\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n')

  it.each([
    ['Japanese', '見積書 第2版.pdf'],
    ['an emoji', '🔧 dyno sheet.pdf'],
    ['an emoji sequence and accents', '👩‍🔧 café.pdf'],
  ])('serves an attachment named in %s with 200, an ASCII filename and the exact name as filename* (RFC 6266, RFC 8187)', async (_what, name) => {
    const upload = await call(`/api/attachments?kind=attachment&name=${encodeURIComponent(name)}`, {
      method: 'POST', headers: as(jar, address, { 'content-type': 'application/octet-stream' }), body: new Uint8Array(pdf),
    })
    expect(upload.status, JSON.stringify(upload.body)).toBe(201)
    expect(upload.body.name).toBe(name)

    const got = await call(`/api/attachments/${upload.body.id}`, { headers: as(jar, address) })
    expect(got.status).toBe(200)
    const header = got.headers.get('content-disposition')!
    // RFC 8187 §3.2.1: ext-value = charset "'" [ language ] "'" value-chars, the UTF-8 bytes percent-encoded.
    const extended = /filename\*=UTF-8''([^;\s]+)/.exec(header)
    expect(extended).not.toBeNull()
    expect(decodeURIComponent(extended![1]!)).toBe(name)
    // RFC 6266 §4.3: the plain filename is the fallback for old clients, so it stays within ASCII.
    const plain = /filename="([^"]*)"/.exec(header)
    expect(plain).not.toBeNull()
    expect(plain![1]).toMatch(/^[\x20-\x7E]+\.pdf$/)
    // The content-disposition package (the reference parser of the header) reads the exact name back.
    expect(contentDisposition.parse(header)).toEqual({ type: 'attachment', parameters: { filename: name } })
  })
})

describe('the public CSV of a pull', () => {
  it('keeps a label with a line break and a formula inside its comment cell, and no cell starts a formula (OWASP "CSV Injection")', async () => {
    const { pullId, build } = await makeSubmittedPull(ctx.db)
    const label = 'Baseline\r\n=HYPERLINK("http://evil.test","open"),@SUM(1+1)\n-2+3'
    await ctx.db.update(schema.dynoPulls).set({ label }).where(eq(schema.dynoPulls.id, pullId))
    try {
      const res = await call(`/api/builds/${build.slug}/pulls/${pullId}/curve.csv`)
      expect(res.status).toBe(200)
      const text = String(res.body)
      const lines = text.trimEnd().split('\n')
      // Nothing from the label starts a line of its own: the comment, the column names, then only figures.
      expect(lines[0]).toContain('Baseline =HYPERLINK')
      expect(lines[1]).toBe('rpm,power_hp,torque_lbft')
      for (const line of lines.slice(2)) expect(line).toMatch(/^\d+,[\d.]+,[\d.]+$/)
      expect(text).not.toMatch(/\r/)

      // Read as a spreadsheet would (Papa Parse, RFC 4180): one comment cell, and no cell that begins a formula.
      const rows = Papa.parse<string[]>(text.trimEnd(), { delimiter: ',', skipEmptyLines: true }).data
      expect(rows[0]).toHaveLength(1)
      expect(rows[0]![0]).toMatch(/^# Baseline /)
      for (const row of rows) for (const cell of row) expect(cell, cell).not.toMatch(/^[=+\-@\t\r]/)
    }
    finally {
      await ctx.db.delete(schema.dynoPulls).where(eq(schema.dynoPulls.id, pullId))
    }
  })
})

describe('a 4xx says what is wrong', () => {
  it('carries the route\'s own message and the reason phrase, not "Server Error", for an API route and for a page', async () => {
    const missing = await call('/api/builds/no-such-build')
    expect(missing.status).toBe(404)
    expect(missing.body.message).toBe('No published build has that address.')
    // RFC 9110 §15.5.5: 404 is "Not Found".
    expect(missing.body.statusMessage).toBe('Not Found')

    const bad = await call('/api/builds/no-such-build/pulls/abc/curve.csv')
    expect(bad.status).toBe(400)
    expect(bad.body.message).toContain('An id is a whole number')
    expect(JSON.stringify(bad.body)).not.toContain('Server Error')

    // A page that throws its own 404, asked for as JSON (a script) and as HTML (a browser).
    const asJson = await call('/builds/no-such-build', { headers: { accept: 'application/json' } })
    expect(asJson.status).toBe(404)
    expect(asJson.body.message).toBe('No published build has that address.')
    const asPage = await call('/builds/no-such-build', { headers: { accept: 'text/html' } })
    expect(asPage.status).toBe(404)
    expect(String(asPage.body)).toContain('No published build has that address.')

    // An API route opened in a browser renders the error page with the route's message.
    const apiInBrowser = await call('/api/builds/no-such-build', { headers: { accept: 'text/html' } })
    expect(apiInBrowser.status).toBe(404)
    expect(String(apiInBrowser.body)).toMatch(/data-test="error-message"[^>]*>\s*No published build has that address\./)
  })
})

describe('while MariaDB is away', () => {
  /** Driver and host details that must never reach a client (the page's own payload names the site's address, so it is checked for the driver's words only). */
  const driverText = /ECONNREFUSED|PROTOCOL_|127\.0\.0\.1|Failed query|select |connect /i
  const driverWords = /ECONNREFUSED|PROTOCOL_CONNECTION|Failed query/

  async function publishedSlug(): Promise<string> {
    const [row] = await ctx.db.select({ slug: schema.builds.slug }).from(schema.builds).where(eq(schema.builds.status, 'published')).limit(1)
    return row!.slug
  }

  async function until(check: () => Promise<boolean>, what: string, limitMs = 30_000) {
    const end = Date.now() + limitMs
    while (Date.now() < end) {
      if (await check().catch(() => false)) return
      await new Promise(r => setTimeout(r, 250))
    }
    throw new Error(`${what} did not happen within ${limitMs} ms`)
  }

  it('answers 503 with Retry-After on the API, a build page and the health check, then recovers by itself when it is back', async () => {
    const slug = await publishedSlug()
    expect((await call(`/api/builds/${slug}`)).status).toBe(200)
    const cfg = loadConfig()
    expect(await stopMariadb(cfg)).toBe(true)
    try {
      // An anonymous visitor's answer cached just before (server/utils/public-cache.ts) still goes out while MariaDB is away.
      expect((await call(`/api/builds/${slug}`)).status).toBe(200)
      // Any Auth.js cookie skips that cache, so these reach the database.
      const fresh = { headers: { cookie: 'authjs.callback-url=%2F' } }
      for (const path of [`/api/builds/${slug}`, `/api/builds/${slug}/curves`, '/api/builds']) {
        const res = await call(path, fresh)
        expect(res.status, path).toBe(503)
        // RFC 9110 §10.2.3: Retry-After as a number of seconds.
        expect(Number(res.headers.get('retry-after')), path).toBeGreaterThan(0)
        expect(res.body.message, path).toMatch(/database/i)
        expect(JSON.stringify({ ...res.body, url: undefined }), path).not.toMatch(driverText)
      }

      const page = await call(`/builds/${slug}`, { headers: { accept: 'text/html', ...fresh.headers } })
      expect(page.status).toBe(503)
      expect(Number(page.headers.get('retry-after'))).toBeGreaterThan(0)
      expect(page.headers.get('content-type')).toContain('text/html')
      expect(String(page.body)).toMatch(/data-test="error-message"[^>]*>\s*This page cannot be shown just now/)
      expect(String(page.body)).not.toMatch(driverWords)

      const health = await call('/api/health')
      expect(health.status).toBe(503)
      expect(Number(health.headers.get('retry-after'))).toBeGreaterThan(0)
      expect(health.body.message).toBe('The database does not answer.')
      expect(JSON.stringify({ ...health.body, url: undefined })).not.toMatch(driverText)
    }
    finally {
      // The rest of the suite shares this instance: it is started again whatever happened above.
      await startMariadb(cfg)
    }

    // Nothing restarts the app: its pool makes new connections once MariaDB answers again.
    await until(async () => (await call('/api/health')).status === 200, 'the health check answering 200 again')
    expect((await call(`/api/builds/${slug}`)).status).toBe(200)
    expect((await call(`/builds/${slug}`, { headers: { accept: 'text/html' } })).status).toBe(200)
  })
})
