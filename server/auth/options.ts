import type { AuthConfig } from '@auth/core'
import { CredentialsSignin } from '@auth/core/errors'
import Credentials from '@auth/core/providers/credentials'
import { hash, verify } from '@node-rs/argon2'
import type { H3Event } from 'h3'
import type { Role } from '#shared/domain'
import { linkTokenSchema, passwordSignInSchema, type UnitSystem } from '#shared/schemas/auth'
import { consumeLink, findUserByEmail, issueLink } from '../services/accounts'
import { emails } from '../services/mail-templates'
import { enqueueAfterResponse } from '../services/outbox'
import { authOrigin, authSecret, clientAddress, loadAccount, siteOrigin } from '../utils/auth'
import { useDb } from '../utils/db'
import { SESSION_MAX_AGE_S, sessionCurrent, signInRefusal } from './policy'
import { bucketKey, giveBackTokens, POLICIES, signInBuckets, takeTokens } from './rate-limit'

/** A refused sign-in; the code reaches the sign-in form, which turns it into words. Codes never say whether an e-mail is registered. */
class SignInRefused extends CredentialsSignin {
  constructor(code: 'invalid' | 'rate_limited' | 'unverified' | 'suspended' | 'link_invalid' | 'email_taken') {
    super(code)
    this.code = code
  }
}

// Verified against when the e-mail is unknown, so a wrong e-mail takes as long as a wrong password.
let decoyHash: Promise<string> | undefined
const decoy = () => (decoyHash ??= hash('decoy password that no account has'))

/** The Auth.js configuration for one request: two credentials providers (password, e-mailed link) and JWT sessions that carry id, name and role. */
export function authOptions(event: H3Event): AuthConfig {
  const db = useDb()
  const address = clientAddress(event)

  /**
   * The account-wide bucket ran dry: tell the owner, at most once an hour, that password sign-in
   * is paused and that a link still works. The same steps run for an unknown address, and the mail
   * goes out after the answer, so the refusal says nothing about whether the address is registered.
   */
  async function noticePaused(email: string) {
    const notice = await takeTokens(db, [{ key: bucketKey.signInPausedNotice(email), policy: POLICIES.signInPausedNotice }])
    const user = await findUserByEmail(db, email)
    if (notice.allowed && user && !user.suspendedAt) enqueueAfterResponse(event, useDb(), { to: user.email, ...emails.signInPaused(user.name, `${siteOrigin(event)}/sign-in`) })
  }

  async function authorizePassword(raw: Partial<Record<string, unknown>>) {
    const parsed = passwordSignInSchema.safeParse(raw)
    if (!parsed.success) throw new SignInRefused('invalid')
    const { email, password } = parsed.data
    const buckets = signInBuckets(email, address)
    const limit = await takeTokens(db, buckets)
    if (!limit.allowed) {
      if (limit.refused.includes(bucketKey.signInAccount(email))) await noticePaused(email)
      throw new SignInRefused('rate_limited')
    }
    const user = await findUserByEmail(db, email)
    const matches = user?.passwordHash ? await verify(user.passwordHash, password) : (await verify(await decoy(), password), false)
    if (!user || !matches) throw new SignInRefused('invalid')
    await giveBackTokens(db, buckets)
    const refusal = signInRefusal(user)
    if (refusal === 'unverified') {
      const token = await issueLink(db, { userId: user.id, purpose: 'verify_email' })
      enqueueAfterResponse(event, useDb(), { to: user.email, ...emails.verify(user.name, `${siteOrigin(event)}/sign-in/link?token=${token}`) })
    }
    if (refusal) throw new SignInRefused(refusal)
    return { id: String(user.id), name: user.name, email: user.email, role: user.role, units: user.unitPreference, sessionVersion: user.sessionVersion }
  }

  async function authorizeLink(raw: Partial<Record<string, unknown>>) {
    const parsed = linkTokenSchema.safeParse(raw)
    if (!parsed.success) throw new SignInRefused('link_invalid')
    const buckets = [{ key: bucketKey.signInAddress(address), policy: POLICIES.signInAddress }]
    if (!(await takeTokens(db, buckets)).allowed) throw new SignInRefused('rate_limited')
    const outcome = await consumeLink(db, parsed.data.token)
    if (!outcome.ok) throw new SignInRefused(outcome.reason === 'invalid' ? 'link_invalid' : outcome.reason)
    await giveBackTokens(db, buckets)
    const { user } = outcome
    if (outcome.previousEmail) enqueueAfterResponse(event, useDb(), { to: outcome.previousEmail, ...emails.emailChanged(user.name, user.email) })
    return { id: String(user.id), name: user.name, email: user.email, role: user.role, units: user.unitPreference, sessionVersion: user.sessionVersion }
  }

  return {
    basePath: authOrigin(event).pathname,
    secret: authSecret(),
    trustHost: true,
    session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_S },
    pages: { signIn: '/sign-in', error: '/sign-in', verifyRequest: '/check-inbox' },
    logger: {
      // Refused sign-ins are expected traffic; anything else is worth a line in the log.
      error: (err) => {
        if ((err as { type?: string }).type !== 'CredentialsSignin') console.error('[auth]', err)
      },
    },
    providers: [
      Credentials({ id: 'password', name: 'Password', credentials: { email: {}, password: {} }, authorize: authorizePassword }),
      Credentials({ id: 'link', name: 'E-mailed link', credentials: { token: {} }, authorize: authorizeLink }),
    ],
    callbacks: {
      async jwt({ token, user, account }) {
        if (user) {
          const u = user as { id: string, role: Role, units: UnitSystem, sessionVersion: number }
          return { ...token, sub: u.id, role: u.role, units: u.units, method: account?.provider, authAt: Date.now(), sv: u.sessionVersion }
        }
        // Every read of the session re-checks the account: a suspended, deleted or signed-out-everywhere one loses its session here.
        const row = await loadAccount(Number(token.sub))
        if (!row || row.suspendedAt || !sessionCurrent(row, token.sv)) return null
        return { ...token, name: row.name, email: row.email, role: row.role, units: row.unitPreference }
      },
      session({ session, token }) {
        return {
          ...session,
          user: { id: Number(token.sub), name: token.name ?? '', email: token.email ?? '', role: token.role, units: token.units },
        } as unknown as typeof session
      },
    },
  }
}
