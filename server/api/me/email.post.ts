import { emailChangeSchema } from '#shared/schemas/auth'
import { emails } from '../../services/mail-templates'
import { enqueueAfterResponse } from '../../services/outbox'
import { bucketKey, POLICIES, takeTokens } from '../../auth/rate-limit'
import { findUserByEmail, issueLink } from '../../services/accounts'

/**
 * Starts an e-mail change: a confirmation link goes to the new address, and the account moves only
 * when it is used. The answer does not say whether the new address already has an account.
 */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { email, currentPassword } = await readValidatedBody(event, validator(emailChangeSchema))
  if (email === user.email) throw fieldError('email', 'That is already your e-mail address.')
  await confirmCurrentPassword(event, user, currentPassword)
  const db = useDb()
  const limit = await takeTokens(db, [
    { key: bucketKey.linkAccount(email), policy: POLICIES.linkAccount },
    { key: bucketKey.linkAddress(clientAddress(event)), policy: POLICIES.linkAddress },
  ])
  if (!limit.allowed) throw createError({ status: 429, message: 'Too many links asked for: wait a few minutes and try again.' })
  const origin = siteOrigin(event)
  if (await findUserByEmail(db, email)) {
    enqueueAfterResponse(event, useDb(), { to: email, ...emails.emailInUse(`${origin}/sign-in`) })
  }
  else {
    const token = await issueLink(db, { userId: user.id, purpose: 'change_email', newEmail: email })
    enqueueAfterResponse(event, useDb(), { to: email, ...emails.changeEmail(user.name, `${origin}/sign-in/link?token=${token}`) })
  }
  setResponseStatus(event, 202)
  return { message: `We sent a confirmation link to ${email}. Your account moves to it when you use the link.` }
})
