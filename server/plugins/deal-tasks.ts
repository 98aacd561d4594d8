import { autoApproveDue } from '../services/milestones'
import { drainOutbox } from '../services/outbox'

/**
 * Two timers beside the server: the mail outbox is drained every few seconds (a mail that fails
 * waits and is tried again), and approvals due after the configured days are made every few minutes.
 * Each run is skipped while the previous one is still going.
 */
/** Mails claimed per batch by the outbox drainer. */
const OUTBOX_BATCH = 20

export default defineNitroPlugin((nitroApp) => {
  const c = useRuntimeConfig()
  let draining = false
  let approving = false
  // The site's host names the outbox mails' Message-IDs (<outbox-<id>.<hash>@host>).
  const messageIdHost = new URL(dealSiteUrl()).hostname
  // While MariaDB is away the outage is one line now and then, not one per tick.
  const log = (what: string, error: unknown) => noteDatabaseOutage(error, `[deals] ${what}`) || console.error(`[deals] ${what}:`, error instanceof Error ? error.message : error)
  const outbox = setInterval(async () => {
    if (draining || !c.databaseUrl) return
    draining = true
    try {
      // A full batch means more is waiting: keep going (up to ten batches a tick) rather than wait for the next tick.
      for (let round = 0; round < 10; round++) {
        const { sent, failed } = await drainOutbox(useDb(), sendMail, { batch: OUTBOX_BATCH, host: messageIdHost })
        if (sent + failed < OUTBOX_BATCH) break
      }
    }
    catch (error) {
      log('draining the outbox failed', error)
    }
    finally {
      draining = false
    }
  }, Number(c.outboxIntervalMs) || 2000)
  const approvals = setInterval(async () => {
    if (approving || !c.databaseUrl || !c.stripeSecretKey) return
    approving = true
    try {
      await autoApproveDue(useDealContext())
    }
    catch (error) {
      log('automatic approval failed', error)
    }
    finally {
      approving = false
    }
  }, Number(c.dealTaskIntervalMs) || 600_000)
  outbox.unref()
  approvals.unref()
  nitroApp.hooks.hook('close', () => {
    clearInterval(outbox)
    clearInterval(approvals)
  })
})
