import { Agent as HttpAgent, request as httpRequest, type IncomingHttpHeaders } from 'node:http'
import { Agent as HttpsAgent, request as httpsRequest } from 'node:https'

/** One answer as the load sees it: the status (0 when none came), the body text, and the time it took. */
export interface Answer {
  status: number
  body: string
  ms: number
  /** 'timeout' or the socket error's code when no status came back. */
  error: string | null
  headers: IncomingHttpHeaders
}

/** A cookie jar per virtual user: what the app set, sent back as one Cookie header. */
export class CookieJar {
  private cookies = new Map<string, string>()

  take(headers: IncomingHttpHeaders): void {
    for (const line of headers['set-cookie'] ?? []) {
      const [pair, ...attrs] = line.split(';')
      const eq = pair!.indexOf('=')
      if (eq < 0) continue
      const name = pair!.slice(0, eq).trim()
      const value = pair!.slice(eq + 1).trim()
      const expired = attrs.some(a => /^\s*max-age=0/i.test(a) || /^\s*expires=thu, 01 jan 1970/i.test(a))
      if (expired || value === '') this.cookies.delete(name)
      else this.cookies.set(name, value)
    }
  }

  has(name: string): boolean {
    return this.cookies.has(name)
  }

  header(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  }

  copy(): CookieJar {
    const jar = new CookieJar()
    for (const [k, v] of this.cookies) jar.cookies.set(k, v)
    return jar
  }
}

/** Keep-alive connection pools, one per base URL, sized so every virtual user can hold a connection. */
export class Client {
  private readonly http: HttpAgent
  private readonly https: HttpsAgent

  constructor(connections: number, private readonly timeoutMs: number) {
    // With a socket timeout set, Node's agent closes an idle connection a second before the server's
    // announced keep-alive timeout (Keep-Alive: timeout=5); without one it keeps it, and a request sent
    // on a connection the server is closing fails with ECONNRESET.
    const options = { keepAlive: true, maxSockets: connections, maxFreeSockets: connections, timeout: timeoutMs }
    this.http = new HttpAgent(options)
    this.https = new HttpsAgent(options)
  }

  /** One request with a hard timeout; never throws: a failure is an Answer with status 0. */
  send(url: string, opts: { method?: string, headers?: Record<string, string>, body?: string, jar?: CookieJar | null } = {}): Promise<Answer> {
    const target = new URL(url)
    const secure = target.protocol === 'https:'
    const headers: Record<string, string> = { accept: 'application/json', ...opts.headers }
    if (opts.jar) {
      const cookie = opts.jar.header()
      if (cookie) headers.cookie = cookie
    }
    if (opts.body !== undefined) headers['content-length'] = String(Buffer.byteLength(opts.body))
    const started = performance.now()
    return new Promise((resolveAnswer) => {
      let settled = false
      const finish = (a: Omit<Answer, 'ms'>) => {
        if (settled) return
        settled = true
        clearTimeout(timer)
        resolveAnswer({ ...a, ms: performance.now() - started })
      }
      const req = (secure ? httpsRequest : httpRequest)(target, { method: opts.method ?? 'GET', headers, agent: secure ? this.https : this.http }, (res) => {
        const chunks: Buffer[] = []
        res.on('data', (c: Buffer) => chunks.push(c))
        res.on('end', () => {
          opts.jar?.take(res.headers)
          finish({ status: res.statusCode ?? 0, body: Buffer.concat(chunks).toString('utf8'), error: null, headers: res.headers })
        })
        res.on('error', err => finish({ status: 0, body: '', error: (err as NodeJS.ErrnoException).code ?? err.message, headers: {} }))
      })
      // The timer covers the whole exchange (connect, wait, body), not only socket idleness.
      const timer = setTimeout(() => {
        finish({ status: 0, body: '', error: 'timeout', headers: {} })
        req.destroy()
      }, this.timeoutMs)
      req.on('error', err => finish({ status: 0, body: '', error: (err as NodeJS.ErrnoException).code ?? err.message, headers: {} }))
      if (opts.body !== undefined) req.write(opts.body)
      req.end()
    })
  }

  close(): void {
    this.http.destroy()
    this.https.destroy()
  }
}

/** Parses a JSON answer, or null when the body is not JSON. */
export function json<T>(answer: Answer): T | null {
  try {
    return JSON.parse(answer.body) as T
  }
  catch {
    return null
  }
}

/**
 * Signs in through Auth.js as the pages do: the CSRF token, then a form post to the credentials
 * callback with json=true. Returns null on success, else what went wrong.
 */
export async function signIn(client: Client, base: string, jar: CookieJar, address: string, email: string, password: string): Promise<string | null> {
  const headers = { 'x-forwarded-for': address }
  const csrf = await client.send(`${base}/api/auth/csrf`, { headers, jar })
  const token = json<{ csrfToken?: string }>(csrf)?.csrfToken
  if (csrf.status !== 200 || !token) return `csrf answered ${csrf.status || csrf.error}`
  const res = await client.send(`${base}/api/auth/callback/password`, {
    method: 'POST',
    jar,
    headers: { ...headers, 'content-type': 'application/x-www-form-urlencoded' },
    body: new URLSearchParams({ email, password, csrfToken: token, callbackUrl: `${base}/`, json: 'true' }).toString(),
  })
  const url = json<{ url?: string }>(res)?.url
  if (!url) return `sign-in answered ${res.status || res.error}`
  const params = new URL(url).searchParams
  if (params.get('error')) return `sign-in refused: ${params.get('code') ?? params.get('error')}`
  return null
}
