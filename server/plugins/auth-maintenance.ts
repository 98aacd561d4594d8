import { pruneBuckets } from '../auth/rate-limit'
import { pruneLinks } from '../services/accounts'

/** Hourly: drops rate-limit buckets untouched for a day and e-mailed links a week past their expiry. */
export default defineNitroPlugin((nitroApp) => {
  const prune = () => Promise.all([pruneBuckets(useDb()), pruneLinks(useDb())])
    .catch((err: Error) => console.error(`[auth] pruning failed: ${err.message}`))
  const timer = setInterval(prune, 3_600_000)
  timer.unref()
  nitroApp.hooks.hook('close', () => clearInterval(timer))
})
