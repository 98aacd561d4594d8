// A local fake of the Stripe API endpoints Torquewright uses, speaking the same wire format:
// form-encoded requests, Bearer keys, idempotency keys, Stripe-shaped objects and errors, a hosted
// payment page for Checkout Sessions and signed webhook events. Never bundled into the app.
import { createHash, randomBytes } from 'node:crypto'
import { existsSync, readFileSync, renameSync, writeFileSync } from 'node:fs'
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http'
import type { AddressInfo } from 'node:net'
import { ApiError } from './errors'
import { FormError, canonicalForm, parseForm, type FormObject } from './form'
import { Ledger, TEST_CARDS } from './ledger'
import { cardProblem, paymentPage } from './page'
import { WebhookSender } from './webhooks'

/** The API version the installed SDK (stripe 23.1.0) pins; events carry it. */
export const FAKE_API_VERSION = '2026-10-28.endive'

const MAX_BODY_BYTES = 1_000_000

export interface PaymentsFakeOptions {
  host?: string
  /** 0 picks a free port. */
  port?: number
  secretKey: string
  webhookSecret: string
  /** Where signed events go (the app's /api/webhooks/stripe); null sends none. */
  webhookUrl: string | null
  retryDelaysMs?: number[]
  log?: (line: string) => void
  /** Where the books are kept between runs (the demo's data folder); without it they live in memory only. */
  stateFile?: string
}

export interface PaymentsFake {
  url: string
  port: number
  ledger: Ledger
  webhooks: WebhookSender
  close: () => Promise<void>
}

interface Saved {
  fingerprint: string
  status: number
  body: string
}

class HttpBodyTooLarge extends Error {}

function readBody(req: IncomingMessage): Promise<string> {
  return new Promise((resolveBody, reject) => {
    const chunks: Buffer[] = []
    let size = 0
    req.on('data', (chunk: Buffer) => {
      size += chunk.length
      if (size > MAX_BODY_BYTES) {
        reject(new HttpBodyTooLarge())
        req.destroy()
        return
      }
      chunks.push(chunk)
    })
    req.on('end', () => resolveBody(Buffer.concat(chunks).toString('utf8')))
    req.on('error', reject)
  })
}

/** The key a request carries: `Authorization: Bearer sk_…`, or the key as the basic-auth user name. */
function apiKeyOf(req: IncomingMessage): string | null {
  const header = req.headers.authorization
  if (!header) return null
  const bearer = header.match(/^Bearer\s+(\S+)$/i)
  if (bearer) return bearer[1]!
  const basic = header.match(/^Basic\s+(\S+)$/i)
  if (basic) return Buffer.from(basic[1]!, 'base64').toString('utf8').split(':')[0] || null
  return null
}

const masked = (key: string) => (key.length <= 12 ? `${key.slice(0, 3)}***` : `${key.slice(0, 8)}${'*'.repeat(key.length - 12)}${key.slice(-4)}`)

export async function createPaymentsFake(options: PaymentsFakeOptions): Promise<PaymentsFake> {
  const host = options.host ?? '127.0.0.1'
  const log = options.log ?? (() => {})
  let publicUrl = ''
  const webhooks = new WebhookSender({
    url: options.webhookUrl,
    secret: options.webhookSecret,
    retryDelaysMs: options.retryDelaysMs ?? [500, 1000, 2000, 4000, 8000, 16000],
    log,
  })
  const ledger = new Ledger(() => publicUrl, event => webhooks.send(event), FAKE_API_VERSION)
  const saved = new Map<string, Saved>()
  const inProgress = new Set<string>()
  if (options.stateFile && existsSync(options.stateFile)) {
    try {
      const state = JSON.parse(readFileSync(options.stateFile, 'utf8')) as { ledger: Parameters<Ledger['restore']>[0], idempotency: [string, Saved][] }
      ledger.restore(state.ledger)
      for (const [k, v] of state.idempotency ?? []) saved.set(k, v)
      log(`restored the books from ${options.stateFile}`)
    }
    catch (error) {
      log(`could not read ${options.stateFile}, starting empty: ${error instanceof Error ? error.message : String(error)}`)
    }
  }
  /** Writes the books after a change (atomically, by rename), when a state file is configured. */
  function persist() {
    if (!options.stateFile) return
    const tmp = `${options.stateFile}.tmp`
    writeFileSync(tmp, JSON.stringify({ ledger: ledger.snapshot(), idempotency: [...saved.entries()] }))
    renameSync(tmp, options.stateFile)
  }

  function sendJson(res: ServerResponse, status: number, body: string, headers: Record<string, string> = {}) {
    res.writeHead(status, { 'content-type': 'application/json', 'cache-control': 'no-store', ...headers })
    res.end(body)
  }

  function sendHtml(res: ServerResponse, status: number, html: string) {
    res.writeHead(status, { 'content-type': 'text/html; charset=utf-8', 'cache-control': 'no-store' })
    res.end(html)
  }

  /** Runs one /v1 request; returns the status and the object or error. */
  function dispatch(method: string, path: string, params: FormObject, request: { id: string, idempotency_key: string | null }): { status: number, body: unknown } {
    const routes: [string, RegExp, (m: RegExpMatchArray) => unknown][] = [
      ['POST', /^\/v1\/accounts$/, () => ledger.createAccount(params)],
      ['GET', /^\/v1\/accounts\/([^/]+)$/, m => ledger.getAccount(m[1]!)],
      ['POST', /^\/v1\/checkout\/sessions$/, () => ledger.createSession(params)],
      ['GET', /^\/v1\/checkout\/sessions\/([^/]+)$/, m => ledger.getSession(m[1]!, params)],
      ['POST', /^\/v1\/checkout\/sessions\/([^/]+)\/expire$/, m => ledger.expireSession(m[1]!, request)],
      ['GET', /^\/v1\/payment_intents\/([^/]+)$/, m => ledger.getPaymentIntent(m[1]!, params)],
      ['POST', /^\/v1\/refunds$/, () => ledger.createRefund(params, request)],
      ['GET', /^\/v1\/refunds\/([^/]+)$/, m => ledger.get(ledger.refunds, 'refund', m[1]!)],
      ['POST', /^\/v1\/transfers$/, () => ledger.createTransfer(params, request)],
      ['GET', /^\/v1\/transfers\/([^/]+)$/, m => ledger.get(ledger.transfers, 'transfer', m[1]!)],
      ['GET', /^\/v1\/events\/([^/]+)$/, m => ledger.get(ledger.events, 'event', m[1]!)],
    ]
    for (const [verb, pattern, run] of routes) {
      const m = verb === method ? path.match(pattern) : null
      if (m) return { status: 200, body: run(m) }
    }
    throw new ApiError(404, 'invalid_request_error', `Unrecognized request URL (${method}: ${path}). This fake serves only the endpoints Torquewright uses; see the README's Payments section.`)
  }

  async function handleApi(req: IncomingMessage, res: ServerResponse, url: URL) {
    const requestId = `req_${randomBytes(7).toString('hex')}`
    const idempotencyKey = typeof req.headers['idempotency-key'] === 'string' ? req.headers['idempotency-key'] : null
    const headers: Record<string, string> = { 'request-id': requestId, 'stripe-version': String(req.headers['stripe-version'] ?? FAKE_API_VERSION) }
    if (idempotencyKey) headers['idempotency-key'] = idempotencyKey
    const fail = (error: ApiError) => sendJson(res, error.status, JSON.stringify(error.body()), headers)
    const key = apiKeyOf(req)
    if (!key) {
      return fail(new ApiError(401, 'invalid_request_error', 'You did not provide an API key. Send it as "Authorization: Bearer <secret key>".'))
    }
    if (key !== options.secretKey) {
      return fail(new ApiError(401, 'invalid_request_error', `Invalid API Key provided: ${masked(key)}`, { code: 'api_key_invalid' }))
    }
    const method = req.method ?? 'GET'
    let params: FormObject
    try {
      params = parseForm(method === 'GET' || method === 'DELETE' ? url.search.slice(1) : await readBody(req))
    }
    catch (error) {
      if (error instanceof HttpBodyTooLarge) return fail(new ApiError(413, 'invalid_request_error', 'The request body is larger than this fake accepts (1 MB).'))
      if (error instanceof FormError) return fail(new ApiError(400, 'invalid_request_error', error.message, { param: error.param }))
      throw error
    }
    const savedKey = idempotencyKey && method === 'POST' ? `${key}\u0000${idempotencyKey}` : null
    const fingerprint = createHash('sha256').update(`${method} ${url.pathname}\n${canonicalForm(params)}`).digest('hex')
    if (savedKey) {
      const earlier = saved.get(savedKey)
      if (earlier) {
        if (earlier.fingerprint !== fingerprint) {
          return fail(new ApiError(400, 'idempotency_error', `Keys for idempotent requests can be used only with the same parameters they were first used with. Use a new key if you meant a different request (key '${idempotencyKey}').`))
        }
        return sendJson(res, earlier.status, earlier.body, { ...headers, 'idempotent-replayed': 'true' })
      }
      if (inProgress.has(savedKey)) {
        return fail(new ApiError(409, 'idempotency_error', `Another request with idempotency key '${idempotencyKey}' is still running; try again shortly.`))
      }
      inProgress.add(savedKey)
    }
    try {
      const result = dispatch(method, url.pathname, params, { id: requestId, idempotency_key: idempotencyKey })
      const body = JSON.stringify(result.body)
      // Like the real API, only a request that ran is saved against its key; a refused one may be sent again.
      if (savedKey) saved.set(savedKey, { fingerprint, status: result.status, body })
      if (method === 'POST') persist()
      log(`${method} ${url.pathname} → ${result.status}`)
      return sendJson(res, result.status, body, headers)
    }
    catch (error) {
      if (error instanceof ApiError) {
        log(`${method} ${url.pathname} → ${error.status} ${error.message}`)
        return fail(error)
      }
      log(`${method} ${url.pathname} → 500 ${error instanceof Error ? error.stack : String(error)}`)
      return fail(new ApiError(500, 'api_error', 'The payments fake failed on this request; see its log.'))
    }
    finally {
      if (savedKey) inProgress.delete(savedKey)
    }
  }

  async function handlePage(req: IncomingMessage, res: ServerResponse, sessionId: string) {
    let session
    try {
      session = ledger.session(sessionId)
    }
    catch {
      return sendHtml(res, 404, '<!doctype html><title>Not found</title><p>No payment page has this address.</p>')
    }
    if (req.method === 'GET') return sendHtml(res, 200, paymentPage(session))
    if (req.method !== 'POST') return sendHtml(res, 405, '<!doctype html><p>Method not allowed.</p>')
    const form = new URLSearchParams(await readBody(req))
    const fields = {
      cardNumber: form.get('cardNumber') ?? '', expiry: form.get('expiry') ?? '', cvc: form.get('cvc') ?? '',
      name: form.get('name') ?? '', email: form.get('email') ?? '',
    }
    const values = { email: fields.email, name: fields.name }
    const problem = cardProblem(fields)
    if (problem) return sendHtml(res, 400, paymentPage(session, { message: { kind: 'error', text: problem }, values }))
    const cardNumber = fields.cardNumber.replace(/[\s-]/g, '')
    if (!TEST_CARDS.has(cardNumber)) {
      return sendHtml(res, 400, paymentPage(session, { message: { kind: 'error', text: 'This test page takes only the test cards listed below.' }, values }))
    }
    const result = ledger.pay(sessionId, { cardNumber, name: fields.name, email: fields.email })
    persist()
    if (result.outcome === 'paid') {
      log(`session ${sessionId} paid`)
      res.writeHead(303, { 'location': result.redirect, 'cache-control': 'no-store' })
      return res.end()
    }
    log(`session ${sessionId}: ${result.message}`)
    return sendHtml(res, result.outcome === 'declined' ? 402 : 409, paymentPage(session, { message: { kind: 'error', text: result.message }, values }))
  }

  function handleControl(req: IncomingMessage, res: ServerResponse, url: URL) {
    if (url.pathname === '/_fake/health') return sendJson(res, 200, JSON.stringify({ ok: true }))
    if (url.pathname === '/_fake/deliveries' && req.method === 'GET') return sendJson(res, 200, JSON.stringify(webhooks.deliveries))
    if (url.pathname === '/_fake/events' && req.method === 'GET') {
      const list = [...ledger.events.values()].map(e => ({ id: e.id, type: e.type, created: e.created, objectId: (e.data.object as { id?: string }).id ?? null }))
      return sendJson(res, 200, JSON.stringify(list))
    }
    if (url.pathname === '/_fake/webhooks/hold' && req.method === 'POST') {
      webhooks.hold()
      return sendJson(res, 200, JSON.stringify({ holding: true }))
    }
    if (url.pathname === '/_fake/webhooks/release' && req.method === 'POST') {
      return sendJson(res, 200, JSON.stringify({ released: webhooks.release() }))
    }
    const resend = url.pathname.match(/^\/_fake\/events\/([^/]+)\/resend$/)
    if (resend && req.method === 'POST') {
      const event = ledger.events.get(resend[1]!)
      if (!event) return sendJson(res, 404, JSON.stringify({ error: { type: 'invalid_request_error', message: 'No such event' } }))
      // A resend goes out at once, even while other events are held.
      webhooks.send(event, { now: true })
      return sendJson(res, 202, JSON.stringify({ resent: event.id }))
    }
    return sendJson(res, 404, JSON.stringify({ error: { type: 'invalid_request_error', message: 'No such control route' } }))
  }

  const server = createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://127.0.0.1')
    const work = url.pathname.startsWith('/v1/')
      ? handleApi(req, res, url)
      : url.pathname.startsWith('/pay/')
        ? handlePage(req, res, decodeURIComponent(url.pathname.slice('/pay/'.length)))
        : url.pathname.startsWith('/_fake/')
          ? Promise.resolve(handleControl(req, res, url))
          : Promise.resolve(sendJson(res, 404, JSON.stringify({ error: { type: 'invalid_request_error', message: `Unrecognized request URL (${req.method}: ${url.pathname}).` } })))
    work.catch((error) => {
      log(`unhandled: ${error instanceof Error ? error.stack : String(error)}`)
      if (!res.headersSent) sendJson(res, 500, JSON.stringify({ error: { type: 'api_error', message: 'The payments fake failed on this request.' } }))
      else res.end()
    })
  })
  await new Promise<void>((resolveListen, reject) => {
    server.once('error', reject)
    server.listen(options.port ?? 0, host, () => resolveListen())
  })
  const port = (server.address() as AddressInfo).port
  publicUrl = `http://${host}:${port}`
  log(`payments fake listening on ${publicUrl}`)
  return {
    url: publicUrl,
    port,
    ledger,
    webhooks,
    close: async () => {
      webhooks.close()
      server.closeAllConnections()
      await new Promise<void>(r => server.close(() => r()))
    },
  }
}
