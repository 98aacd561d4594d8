import { linkRequestSchema } from '#shared/schemas/auth'
import { emails } from '../../services/mail-templates'
import { enqueueAfterResponse } from '../../services/outbox'
import { bucketKey, POLICIES, takeTokens } from '../../auth/rate-limit'
import { findUserByEmail, issueLink } from '../../services/accounts'

/**
 * Asks for a passwordless sign-in link, optionally carrying the page to return to (`next`). Public.
 * The answer is the same whether or not the address has an account.
 */
export default defineEventHandler(async (event) => {
  const { email, next } = await readValidatedBody(event, validator(linkRequestSchema))
  const db = useDb()
  const limit = await takeTokens(db, [
    { key: bucketKey.linkAccount(email), policy: POLICIES.linkAccount },
    { key: bucketKey.linkAddress(clientAddress(event)), policy: POLICIES.linkAddress },
  ])
  if (!limit.allowed) {
    throw createError({ status: 429, message: `Too many links asked for: wait ${Math.ceil(limit.retryAfterMs / 60_000)} minute(s) and try again.` })
  }
  const user = await findUserByEmail(db, email)
  if (user && !user.suspendedAt) {
    const token = await issueLink(db, { userId: user.id, purpose: 'sign_in' })
    // The page the person was on comes back with the link (a path on this site only, checked by the schema).
    const back = next ? `&next=${encodeURIComponent(next)}` : ''
    enqueueAfterResponse(event, useDb(), { to: user.email, ...emails.signInLink(user.name, `${siteOrigin(event)}/sign-in/link?token=${token}${back}`) })
  }
  setResponseStatus(event, 202)
  return { message: `If ${email} has an account, a sign-in link is on its way. It works once, for 20 minutes.` }
})
