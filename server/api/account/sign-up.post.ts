import { hash } from '@node-rs/argon2'
import { signUpSchema } from '#shared/schemas/auth'
import { emails } from '../../services/mail-templates'
import { enqueueAfterResponse } from '../../services/outbox'
import { bucketKey, POLICIES, takeTokens } from '../../auth/rate-limit'
import { createAccount, findUserByEmail, issueLink } from '../../services/accounts'

/**
 * Sign-up as a racer, or as a shop owner with the shop. Public. Answers 202 the same way
 * whether or not the e-mail was already registered; the inbox learns which (a confirmation link,
 * or a note that the account exists).
 */
export default defineEventHandler(async (event) => {
  const input = await readValidatedBody(event, validator(signUpSchema))
  const db = useDb()
  const limit = await takeTokens(db, [{ key: bucketKey.linkAddress(clientAddress(event)), policy: POLICIES.linkAddress }])
  if (!limit.allowed) throw createError({ status: 429, message: 'Too many sign-ups from your network: wait a minute and try again.' })
  const passwordHash = await hash(input.password)
  const result = await createAccount(db, input, passwordHash)
  const origin = siteOrigin(event)
  if (result.created) {
    const token = await issueLink(db, { userId: result.userId, purpose: 'verify_email' })
    enqueueAfterResponse(event, useDb(), { to: input.email, ...emails.verify(input.name, `${origin}/sign-in/link?token=${token}`) })
  }
  else {
    const existing = await findUserByEmail(db, input.email)
    enqueueAfterResponse(event, useDb(), { to: input.email, ...emails.alreadyRegistered(existing?.name ?? input.name, `${origin}/sign-in`) })
  }
  setResponseStatus(event, 202)
  return { message: `Check your inbox at ${input.email}: we sent a link to confirm the address. It works once, for 24 hours.` }
})
