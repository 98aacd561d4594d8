// The guards every request passes before a handler runs: cross-site writes refused (CSRF), bodies of
// the wrong type refused, bodies over 1 MB refused before parsing, and the security headers on every
// kind of answer. Each check looks at the database to prove a refused request changed nothing.
import { readFileSync } from 'node:fs'
import { request as httpRequest } from 'node:http'
import { resolve } from 'node:path'
import { count, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { type CookieJar, DEMO_PASSWORD, as, freshAddress, json, signedIn } from '../support/auth'
import { api, baseUrl } from '../support/context'
import { PEOPLE, dealTestContext, makeOrder, requestInput, schema } from '../support/deals'
import { apiRoutes } from '../support/access'
import { readsOwnBody } from '../../server/utils/uploads'
import type { DealContext } from '../../server/services/deal-context'
import type { Database } from '../../server/database/types'

let ctx: DealContext
let db: Database
let close: () => Promise<void>
const jar: Record<'racer' | 'shop', CookieJar> = {} as never
const address = freshAddress()
const ELSEWHERE = 'https://prize-draw.example'
const MB = 1024 * 1024

beforeAll(async () => {
  ({ ctx, db, close } = await dealTestContext())
  jar.racer = await signedIn(PEOPLE.racer)
  jar.shop = await signedIn(PEOPLE.shop)
})
afterAll(async () => {
  await close()
})

const messageCount = async (requestId: number) =>
  (await db.select({ n: count() }).from(schema.requestMessages).where(eq(schema.requestMessages.requestId, requestId)))[0]!.n
const orderStatus = async (orderId: number) =>
  (await db.select({ status: schema.orders.status }).from(schema.orders).where(eq(schema.orders.id, orderId)))[0]!.status

async function newRequest(): Promise<number> {
  const res = await api('/api/requests', json('POST', requestInput({ title: `Guards ${Math.random().toString(36).slice(2, 8)}` }), jar.racer, address))
  expect(res.status).toBe(201)
  return res.body.id as number
}

/** A JSON write as the racer with extra headers (what a browser adds, or what a forged page makes it send). */
const racerPost = (path: string, body: unknown, extra: Record<string, string>) =>
  api(path, { method: 'POST', headers: as(jar.racer, address, { 'content-type': 'application/json', ...extra }), body: JSON.stringify(body) })

/** A form post as the racer: what a hidden <form> on another site makes the browser send. */
const racerForm = (path: string, fields: Record<string, string>, extra: Record<string, string> = {}) =>
  api(path, { method: 'POST', headers: as(jar.racer, address, { 'content-type': 'application/x-www-form-urlencoded', ...extra }), body: new URLSearchParams(fields).toString() })

describe('cross-site writes (CSRF)', () => {
  it('refuses a form post from another site that would cancel the racer\'s order, and the order stays active', async () => {
    const { orderId } = await makeOrder(ctx)
    const forged = await racerForm(`/api/orders/${orderId}/cancel`, { reason: 'forged' }, { 'origin': ELSEWHERE, 'sec-fetch-site': 'cross-site' })
    expect(forged.status).toBe(403)
    expect(forged.body.message).toMatch(/another site/)
    expect(await orderStatus(orderId)).toBe('active')
  })

  it.each([
    ['an Origin of another site', { origin: ELSEWHERE }],
    ['Sec-Fetch-Site: cross-site', { 'sec-fetch-site': 'cross-site' }],
    ['Sec-Fetch-Site: same-site (a sibling subdomain)', { 'sec-fetch-site': 'same-site' }],
    ['no Origin and a Referer of another site', { referer: `${ELSEWHERE}/win` }],
    ['Origin: null (a sandboxed frame)', { origin: 'null' }],
  ])('refuses %s with 403 and posts no message', async (_what, headers) => {
    const id = await newRequest()
    const before = await messageCount(id)
    const res = await racerPost(`/api/requests/${id}/messages`, { body: 'Sent from a page that is not Torquewright.' }, headers)
    expect(res.status).toBe(403)
    expect(await messageCount(id)).toBe(before)
  })

  it('refuses a cross-site cancel of an order even as JSON, and the order stays active', async () => {
    const { orderId } = await makeOrder(ctx)
    const res = await racerPost(`/api/orders/${orderId}/cancel`, { reason: 'forged' }, { 'sec-fetch-site': 'cross-site' })
    expect(res.status).toBe(403)
    expect(await orderStatus(orderId)).toBe('active')
  })

  it('lets the site\'s own pages write (Origin of the site, Sec-Fetch-Site: same-origin)', async () => {
    const id = await newRequest()
    const before = await messageCount(id)
    const res = await racerPost(`/api/requests/${id}/messages`, { body: 'From the thread page itself.' }, { 'origin': baseUrl(), 'sec-fetch-site': 'same-origin', 'referer': `${baseUrl()}/deals/requests/${id}` })
    expect(res.status).toBe(201)
    expect(await messageCount(id)).toBe(before + 1)
  })

  it('checks Auth.js\'s own routes too: a cross-site sign-in post is refused before Auth.js sees it', async () => {
    const res = await api('/api/auth/callback/password', {
      method: 'POST',
      redirect: 'manual',
      headers: as(null, freshAddress(), { 'content-type': 'application/x-www-form-urlencoded', 'origin': ELSEWHERE }),
      body: new URLSearchParams({ email: PEOPLE.racer, password: 'anything', json: 'true' }).toString(),
    })
    expect(res.status).toBe(403)
  })

  it('leaves the signed webhooks to their signature: a cross-site Origin gets the signature\'s 400, not 403', async () => {
    const res = await api('/api/webhooks/stripe', { method: 'POST', headers: { 'content-type': 'application/json', 'origin': ELSEWHERE, 'stripe-signature': 't=1,v1=00' }, body: '{}' })
    expect(res.status).toBe(400)
  })
})

describe('content types', () => {
  it('refuses a form-encoded body to a JSON route with 415, cancelling nothing', async () => {
    const { orderId } = await makeOrder(ctx)
    const res = await racerForm(`/api/orders/${orderId}/cancel`, { reason: 'form post' })
    expect(res.status).toBe(415)
    expect(res.body.message).toMatch(/application\/json/)
    expect(await orderStatus(orderId)).toBe('active')
  })

  it.each([
    ['application/x-www-form-urlencoded', new URLSearchParams({ body: 'a form field' }).toString()],
    ['text/plain', JSON.stringify({ body: 'JSON sent as text/plain, as an enctype=text/plain form does' })],
    ['multipart/form-data; boundary=x', '--x\r\nContent-Disposition: form-data; name="body"\r\n\r\nmultipart\r\n--x--\r\n'],
  ])('refuses %s to the message route with 415 and posts nothing', async (type, body) => {
    const id = await newRequest()
    const before = await messageCount(id)
    const res = await api(`/api/requests/${id}/messages`, { method: 'POST', headers: as(jar.racer, address, { 'content-type': type }), body })
    expect(res.status).toBe(415)
    expect(await messageCount(id)).toBe(before)
  })

  it('takes JSON with a charset parameter (RFC 8259 names no parameter, but clients add one)', async () => {
    const id = await newRequest()
    const res = await racerPost(`/api/requests/${id}/messages`, { body: 'With a charset.' }, { 'content-type': 'application/json; charset=utf-8' })
    expect(res.status).toBe(201)
  })

  it('lets a write without a body through whatever its declared type (the route decides)', async () => {
    const res = await api('/api/me/searches/999999999', { method: 'DELETE', headers: as(jar.racer, address, { 'content-type': 'text/plain' }) })
    expect(res.status).toBe(404)
  })

  it('refuses a JSON body to Auth.js\'s form routes with 415', async () => {
    const res = await api('/api/auth/callback/password', { method: 'POST', redirect: 'manual', headers: as(null, freshAddress(), { 'content-type': 'application/json' }), body: JSON.stringify({ email: PEOPLE.racer }) })
    expect(res.status).toBe(415)
  })
})

/** Sends a body in chunks without a Content-Length (Transfer-Encoding: chunked) and returns the status. */
function chunkedPost(path: string, totalBytes: number, headers: Record<string, string>): Promise<{ status: number, body: string }> {
  return new Promise((resolve, reject) => {
    const url = new URL(path, baseUrl())
    const req = httpRequest(url, { method: 'POST', headers: { ...headers, 'transfer-encoding': 'chunked' } }, (res) => {
      let body = ''
      res.setEncoding('utf8')
      res.on('data', (d: string) => {
        body += d
      })
      res.on('end', () => resolve({ status: res.statusCode ?? 0, body }))
    })
    // The server may close the connection while chunks are still going out; the answer is what counts.
    req.on('error', err => (req.writableEnded ? undefined : reject(err)))
    const chunk = Buffer.alloc(64 * 1024, ' ')
    let sent = 0
    const pump = () => {
      while (sent < totalBytes) {
        sent += chunk.length
        if (!req.write(sent === chunk.length ? Buffer.from(`{"body":"${' '.repeat(chunk.length - 10)}`) : chunk)) {
          req.once('drain', pump)
          return
        }
      }
      req.end('"}')
    }
    pump()
  })
}

describe('body size (1 MB outside the uploads)', () => {
  it('leaves exactly the routes that read their own body (uploads, webhooks) to their own limits', () => {
    const source = (file: string) => readFileSync(resolve(import.meta.dirname, '../../server/api', file), 'utf8')
    const routes = apiRoutes().map(r => ({ ...r, sample: r.pattern.replace(/:[^/]+/g, '1') }))
    const ownReaders = routes.filter(r => /readUploadForm|readLimitedBody/.test(source(r.file)))
    expect(ownReaders.length).toBeGreaterThanOrEqual(5)
    expect(ownReaders.filter(r => !readsOwnBody(r.sample)).map(r => r.file)).toEqual([])
    const jsonReaders = routes.filter(r => /readValidatedBody|readBody\(/.test(source(r.file)))
    expect(jsonReaders.filter(r => readsOwnBody(r.sample)).map(r => r.file)).toEqual([])
  })

  it('refuses a 2 MB JSON body by its Content-Length with 413 and posts nothing', async () => {
    const id = await newRequest()
    const before = await messageCount(id)
    const res = await racerPost(`/api/requests/${id}/messages`, { body: 'x'.repeat(2 * MB) }, {})
    expect(res.status).toBe(413)
    expect(res.body.message).toMatch(/1 MB/)
    expect(await messageCount(id)).toBe(before)
  })

  it('refuses a 2 MB chunked JSON body (no Content-Length) with 413 by counting its bytes, and posts nothing', async () => {
    const id = await newRequest()
    const before = await messageCount(id)
    const res = await chunkedPost(`/api/requests/${id}/messages`, 2 * MB, as(jar.racer, address, { 'content-type': 'application/json' }))
    expect(res.status).toBe(413)
    expect(await messageCount(id)).toBe(before)
  })

  it('refuses an anonymous 2 MB body before anything reads it (sign-up, chunked and declared)', async () => {
    const users = (await db.select({ n: count() }).from(schema.users))[0]!.n
    expect((await chunkedPost('/api/account/sign-up', 2 * MB, as(null, freshAddress(), { 'content-type': 'application/json' }))).status).toBe(413)
    const declared = await api('/api/account/sign-up', json('POST', { role: 'racer', name: 'n'.repeat(2 * MB), email: 'big@example.test', password: 'long enough words' }, null, freshAddress()))
    expect(declared.status).toBe(413)
    expect((await db.select({ n: count() }).from(schema.users))[0]!.n).toBe(users)
  })

  it('still takes a chunked JSON body under the limit, parsed as usual', async () => {
    const id = await newRequest()
    const res = await chunkedPost(`/api/requests/${id}/messages`, 64 * 1024 * 3, as(jar.racer, address, { 'content-type': 'application/json' }))
    // The padded message is longer than a message may be: the route's own validation answers, not the guard.
    expect(res.status).toBe(400)
    expect(res.body).toMatch(/body/)
  })

  it('keeps the uploads\' own limits: a 2 MB attachment is stored, a pull file over its 2 MB limit is 413', async () => {
    const csv = Buffer.from('rpm,hp,tq\n'.concat('3000,250.5,438.6\n'.repeat(Math.ceil(2 * MB / 17))))
    expect(csv.length).toBeGreaterThan(2 * MB)
    const stored = await api(`/api/attachments?kind=attachment&name=long-pull.csv`, { method: 'POST', headers: as(jar.racer, address, { 'content-type': 'text/csv' }), body: new Uint8Array(csv) })
    expect(stored.status).toBe(201)
    expect(stored.body).toMatchObject({ name: 'long-pull.csv', mime: 'text/csv' })
    const over = await api(`/api/attachments?kind=pull&name=pull.csv`, { method: 'POST', headers: as(jar.shop, address, { 'content-type': 'text/csv' }), body: new Uint8Array(Buffer.alloc(3 * MB, 65)) })
    expect(over.status).toBe(413)
  })

  it('takes a chunked upload over 1 MB on an upload route (its own limit applies, not the JSON one)', async () => {
    const res = await chunkedPost('/api/attachments?kind=attachment&name=notes.txt', 2 * MB, as(jar.racer, address, { 'content-type': 'text/plain' }))
    expect(res.status).toBe(201)
  })
})

/**
 * The headers every answer carries (OWASP Secure Headers Project; CSP Level 3 for frame-ancestors).
 * Error answers may name a stricter referrer policy than the pages' (Nitro's error handler sends no-referrer).
 */
function expectSecurityHeaders(headers: Headers, referrer: string[] = ['same-origin']) {
  expect(headers.get('x-content-type-options')).toBe('nosniff')
  expect(headers.get('x-frame-options')).toBe('DENY')
  expect(referrer).toContain(headers.get('referrer-policy'))
  expect(headers.get('content-security-policy')).toMatch(/frame-ancestors 'none'/)
  expect(headers.get('x-powered-by')).toBeNull()
}

const ERROR_REFERRER = ['same-origin', 'no-referrer']

describe('security headers', () => {
  it('sends a nonce CSP on a page, and every script tag carries that nonce', async () => {
    const res = await fetch(`${baseUrl()}/`)
    expect(res.status).toBe(200)
    expectSecurityHeaders(res.headers)
    const csp = res.headers.get('content-security-policy')!
    const nonce = /'nonce-([^']+)'/.exec(csp)?.[1]
    expect(nonce).toBeTruthy()
    expect(csp).not.toMatch(/script-src[^;]*'unsafe-inline'/)
    expect(csp).toMatch(/object-src 'none'/)
    const html = await res.text()
    const scripts = html.match(/<script\b[^>]*>/g) ?? []
    expect(scripts.length).toBeGreaterThan(0)
    for (const tag of scripts) expect(tag).toContain(`nonce="${nonce}"`)
    // A fresh nonce per answer (CSP Level 3: a nonce must not be reused).
    const again = (await fetch(`${baseUrl()}/`)).headers.get('content-security-policy')!
    expect(/'nonce-([^']+)'/.exec(again)?.[1]).not.toBe(nonce)
  })

  it('sends the headers on an API answer, an API error, a refused write and a missing page', async () => {
    const ok = await api('/api/health')
    expect(ok.status).toBe(200)
    expectSecurityHeaders(ok.headers)
    const missing = await api('/api/builds/no-such-build-anywhere')
    expect(missing.status).toBe(404)
    expectSecurityHeaders(missing.headers, ERROR_REFERRER)
    const refused = await api('/api/me/searches', { method: 'POST', headers: { 'content-type': 'application/json', 'origin': ELSEWHERE }, body: '{}' })
    expect(refused.status).toBe(403)
    expectSecurityHeaders(refused.headers, ERROR_REFERRER)
    const page = await fetch(`${baseUrl()}/no-such-page-here`, { headers: { accept: 'text/html' } })
    expect(page.status).toBe(404)
    expectSecurityHeaders(page.headers, ERROR_REFERRER)
    expect(page.headers.get('content-type')).toMatch(/text\/html/)
    // The error page runs the app's scripts too, so it needs the page CSP's nonce on each of them.
    const nonce = /'nonce-([^']+)'/.exec(page.headers.get('content-security-policy')!)?.[1]
    expect(nonce).toBeTruthy()
    for (const tag of (await page.text()).match(/<script\b[^>]*>/g) ?? []) expect(tag).toContain(`nonce="${nonce}"`)
  })

  it('sends no two Set-Cookie lines of the same name, signing in included', async () => {
    const csrf = await fetch(`${baseUrl()}/api/auth/csrf`, { headers: as(null, address) })
    const names = (h: Headers) => h.getSetCookie().map(line => line.split('=')[0])
    expect(new Set(names(csrf.headers)).size).toBe(names(csrf.headers).length)
    const cookie = csrf.headers.getSetCookie().map(l => l.split(';')[0]).join('; ')
    const { csrfToken } = await csrf.json() as { csrfToken: string }
    const res = await fetch(`${baseUrl()}/api/auth/callback/password`, {
      method: 'POST',
      redirect: 'manual',
      headers: as(null, freshAddress(), { 'cookie': cookie, 'content-type': 'application/x-www-form-urlencoded' }),
      body: new URLSearchParams({ email: PEOPLE.racer, password: DEMO_PASSWORD, csrfToken, callbackUrl: `${baseUrl()}/`, json: 'true' }).toString(),
    })
    expect(res.status).toBe(200)
    const set = names(res.headers)
    expect(set).toContain('authjs.session-token')
    expect(new Set(set).size).toBe(set.length)
  })

  it('never sends the session cookie twice on a signed-in page rendered on the server', async () => {
    const page = await fetch(`${baseUrl()}/account`, { headers: as(jar.racer, address, { accept: 'text/html' }) })
    expect(page.status).toBe(200)
    // Rendered signed in: the header's navigation is the racer's.
    expect(await page.text()).toContain('data-role="racer"')
    // A young session's page re-issues nothing (tests/integration/page-session.test.ts); an older one once.
    const lines = page.headers.getSetCookie().filter(line => line.startsWith('authjs.session-token='))
    expect(lines.length).toBeLessThanOrEqual(1)
  })
})
