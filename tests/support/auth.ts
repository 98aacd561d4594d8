import { randomBytes } from 'node:crypto'
import { DEMO_PASSWORD } from '../../scripts/lib/demo-data'
import { api, baseUrl, mailFor, schema, testDb } from './context'
import type { CaughtMail } from './mail-catcher'

/** The demo accounts the access tests act as (scripts/lib/demo-data.ts). */
export const PERSONAS = {
  racer: 'jonah@racer.test',
  shop: 'marisol@harrow-creek.test',
  otherShop: 'gideon@ninefold.test',
  admin: 'admin@torquewright.test',
} as const
export const SHOP = 'harrow-creek-engine-works'
export const OTHER_SHOP = 'ninefold-machine'
export { DEMO_PASSWORD }

/** A client address of its own (the test app trusts X-Forwarded-For), so rate limits of one test never touch another. */
export function freshAddress(): string {
  const b = randomBytes(3)
  return `10.${b[0]}.${b[1]}.${b[2]}`
}

export function uniqueEmail(prefix: string): string {
  return `${prefix}-${randomBytes(4).toString('hex')}@example.test`
}

/** A tiny cookie jar: what the app set, as one Cookie header. */
export class CookieJar {
  private cookies = new Map<string, string>()
  take(headers: Headers) {
    for (const line of headers.getSetCookie()) {
      const [pair, ...attrs] = line.split(';')
      const eq = pair!.indexOf('=')
      const name = pair!.slice(0, eq).trim()
      const value = pair!.slice(eq + 1).trim()
      const expired = attrs.some(a => /^\s*max-age=0/i.test(a) || /^\s*expires=thu, 01 jan 1970/i.test(a))
      if (expired || value === '') this.cookies.delete(name)
      else this.cookies.set(name, value)
    }
  }

  has(name: string) {
    return this.cookies.has(name)
  }

  header(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  }
}

/** Headers for a request as the jar's holder, from a given client address. */
export function as(jar: CookieJar | null, address: string, extra: Record<string, string> = {}): Record<string, string> {
  return { ...(jar ? { cookie: jar.header() } : {}), 'x-forwarded-for': address, ...extra }
}

/** JSON request init for api(). */
export function json(method: string, body: unknown, jar: CookieJar | null, address: string): RequestInit {
  return { method, headers: as(jar, address, { 'content-type': 'application/json' }), body: JSON.stringify(body) }
}

/**
 * Signs in through Auth.js exactly as the pages do: CSRF token, then a form post to the
 * provider's callback with json=true. Returns the refusal code (null on success) and the jar.
 */
export async function signIn(provider: 'password' | 'link', fields: Record<string, string>, address = freshAddress(), jar = new CookieJar()): Promise<{ code: string | null, jar: CookieJar }> {
  const csrf = await fetch(`${baseUrl()}/api/auth/csrf`, { headers: as(jar, address) })
  jar.take(csrf.headers)
  const { csrfToken } = await csrf.json() as { csrfToken: string }
  const res = await fetch(`${baseUrl()}/api/auth/callback/${provider}`, {
    method: 'POST',
    redirect: 'manual',
    headers: as(jar, address, { 'content-type': 'application/x-www-form-urlencoded' }),
    body: new URLSearchParams({ ...fields, csrfToken, callbackUrl: `${baseUrl()}/`, json: 'true' }).toString(),
  })
  jar.take(res.headers)
  const { url } = await res.json() as { url: string }
  const params = new URL(url).searchParams
  return { code: params.get('error') ? (params.get('code') ?? params.get('error')) : null, jar }
}

/** A signed-in jar for a demo account (fails the test if sign-in is refused). */
export async function signedIn(email: string, password = DEMO_PASSWORD): Promise<CookieJar> {
  const { code, jar } = await signIn('password', { email, password })
  if (code) throw new Error(`sign-in as ${email} was refused: ${code}`)
  return jar
}

/** The session as the pages read it. */
export async function session(jar: CookieJar | null) {
  const res = await api('/api/auth/session', { headers: jar ? { cookie: jar.header() } : {} })
  return res.body as { user: { id: number, name: string, email: string, role: string, units: string } } | null
}

/** Waits for a message to one address that `match` accepts (mail goes out after the answer). */
export async function waitForMail(address: string, match: (m: CaughtMail) => boolean = () => true, timeoutMs = 10_000): Promise<CaughtMail> {
  const until = Date.now() + timeoutMs
  while (Date.now() < until) {
    const found = (await mailFor(address)).filter(match)
    if (found.length) return found[found.length - 1]!
    await new Promise(r => setTimeout(r, 100))
  }
  throw new Error(`no matching e-mail reached ${address} within ${timeoutMs} ms`)
}

/** The token of the sign-in link in a message. */
export function linkToken(mail: CaughtMail): string {
  const m = /\/sign-in\/link\?token=([A-Za-z0-9_-]+)/.exec(mail.text)
  if (!m) throw new Error(`no sign-in link in "${mail.subject}"`)
  return m[1]!
}

const hashes = new Map<string, Promise<string>>()

/**
 * An account written straight into the test database (for tests about what happens after sign-up):
 * verified unless told otherwise, with a shop for shops.
 */
export async function makeAccount(opts: { role: 'racer' | 'builder' | 'admin', password?: string, verified?: boolean, name?: string }) {
  const { hash } = await import('@node-rs/argon2')
  const password = opts.password ?? 'a-test-password-1'
  if (!hashes.has(password)) hashes.set(password, hash(password))
  const email = uniqueEmail(opts.role)
  const { db, close } = await testDb()
  try {
    const [row] = await db.insert(schema.users).values({
      email, name: opts.name ?? `Test ${opts.role}`, role: opts.role, passwordHash: await hashes.get(password)!,
      emailVerifiedAt: opts.verified === false ? null : new Date(),
    }).$returningId()
    let shopSlug: string | null = null
    if (opts.role === 'builder') {
      shopSlug = `test-shop-${row!.id}`
      await db.insert(schema.shops).values({ userId: row!.id, shopName: `Test Shop ${row!.id}`, slug: shopSlug, region: 'Test Valley', bio: '', specialties: [], capabilities: [] })
    }
    return { id: row!.id, email, password, shopSlug }
  }
  finally {
    await close()
  }
}

/** The field paths of a 400 from validator() or fieldError() (h3 nests the validator's error under `data`). */
export function issuePaths(body: { data?: { data?: { issues?: { path: string }[] } } }): string[] {
  return (body.data?.data?.issues ?? []).map(i => i.path)
}
