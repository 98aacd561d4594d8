// Every kind of e-mail goes through the outbox: the account mails (sign-up, sign-in link) and an
// admin's decision are written as a mail_outbox row, and the app's drainer delivers that row to the
// mail catcher under the row's own Message-ID (<outbox-<id>.…>). The deal mails are queued the same
// way (tests/integration/outbox.test.ts).
import { and, desc, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { freshAddress, json, makeAccount, PERSONAS, signedIn, uniqueEmail, waitForMail } from '../support/auth'
import { api, schema, testDb } from '../support/context'
import { makeBuildAwaitingCheck, shopOf } from '../support/fixtures'

let ctx: Awaited<ReturnType<typeof testDb>>
beforeAll(async () => {
  ctx = await testDb()
})
afterAll(async () => {
  await ctx.close()
})

/** The newest outbox row for an address and subject; the account mails are queued just after the answer, so it waits a little. */
async function outboxRow(to: string, subject: (s: string) => boolean) {
  for (let i = 0; i < 50; i++) {
    const rows = await ctx.db.select().from(schema.mailOutbox).where(eq(schema.mailOutbox.toAddress, to)).orderBy(desc(schema.mailOutbox.id))
    const row = rows.find(r => subject(r.subject))
    if (row) return row
    await new Promise(r => setTimeout(r, 100))
  }
  throw new Error(`no outbox row for ${to}`)
}

/** The row is queued, and what reaches the catcher is that row: the same subject under its Message-ID. */
async function deliveredThroughOutbox(to: string, subject: (s: string) => boolean) {
  const row = await outboxRow(to, subject)
  const mail = await waitForMail(to, m => subject(m.subject))
  expect(mail.messageId.startsWith(`<outbox-${row.id}.`), mail.messageId).toBe(true)
  expect(mail.subject).toBe(row.subject)
  expect(mail.text.trim()).toBe(row.text.trim())
  const [sent] = await ctx.db.select({ sentAt: schema.mailOutbox.sentAt }).from(schema.mailOutbox).where(and(eq(schema.mailOutbox.id, row.id)))
  expect(sent!.sentAt).not.toBeNull()
  return mail
}

describe('every mail goes through the outbox', () => {
  it('sign-up: the confirmation link', async () => {
    const email = uniqueEmail('outbox-signup')
    const res = await api('/api/account/sign-up', json('POST', { role: 'racer', name: 'Tamsin Orrell', email, password: 'long enough words' }, null, freshAddress()))
    expect(res.status).toBe(202)
    await deliveredThroughOutbox(email, s => s.includes('Confirm your e-mail'))
  })

  it('sign-up again with a registered address: the notice to its owner', async () => {
    const account = await makeAccount({ role: 'racer' })
    const res = await api('/api/account/sign-up', json('POST', { role: 'racer', name: 'Someone Else', email: account.email, password: 'long enough words' }, null, freshAddress()))
    expect(res.status).toBe(202)
    await deliveredThroughOutbox(account.email, s => s.includes('already have a Torquewright account'))
  })

  it('an e-mailed sign-in link', async () => {
    const account = await makeAccount({ role: 'racer' })
    const res = await api('/api/account/sign-in-link', json('POST', { email: account.email }, null, freshAddress()))
    expect(res.status).toBe(202)
    await deliveredThroughOutbox(account.email, s => s.includes('sign-in link'))
  })

  it('an admin\'s decision: a build taken down', async () => {
    const admin = await signedIn(PERSONAS.admin)
    const owner = await makeAccount({ role: 'builder', name: 'Odile Marchetti' })
    const shop = await shopOf(ctx.db, owner.id)
    const { buildId, title } = await makeBuildAwaitingCheck(ctx.db, { shopId: shop.id })
    const res = await api(`/api/admin/listings/${buildId}/unpublish`, json('POST', { reason: 'The parts list names a head this shop does not sell; correct it first.' }, admin, freshAddress()))
    expect(res.status).toBe(200)
    expect(res.body.mailed).toBe(true)
    await deliveredThroughOutbox(owner.email, s => s === `Your build was taken down: ${title}`)
  })
})
