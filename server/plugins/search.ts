import { onBuildChanged } from '../services/build-events'
import { announceBuild } from '../services/saved-searches'
import { checkIndex, loadSyntheticIndex, rebuildIndex, syncBuild, useSearchIndex } from '../services/search'
import { createFeedReader, feedStart, pruneFeed, type FeedReader } from '../services/search-feed'

/** How often the consistency check compares the index with MariaDB (TW_SEARCH_CHECK_MS, default five minutes). */
const CHECK_EVERY_MS = Number(process.env.TW_SEARCH_CHECK_MS) || 5 * 60_000
/** How often the change feed is read for other instances' writes (TW_SEARCH_FEED_MS, default 250 ms; 0 turns it off). */
const FEED_EVERY_MS = process.env.TW_SEARCH_FEED_MS === undefined ? 250 : Number(process.env.TW_SEARCH_FEED_MS)

// Builds the search index from MariaDB at start, then keeps checking it against the database.
// The bench alone (TW_BENCH=1 with TW_SEARCH_SYNTHETIC=<count>) fills it with invented builds instead.
export default defineNitroPlugin((nitroApp) => {
  const synthetic = Number(process.env.TW_SEARCH_SYNTHETIC)
  if (process.env.TW_BENCH === '1' && synthetic > 0) {
    // Built once the server listens (building blocks the event loop), so the bench sees it start.
    setTimeout(() => {
      loadSyntheticIndex(synthetic).then(
        r => console.log(`search: bench index of ${r.documents} invented builds built in ${r.ms} ms`),
        err => console.error('search: the bench index failed to build', err),
      )
    }, 1000)
    return
  }
  if (!useRuntimeConfig().databaseUrl) return
  const db = useDb()
  // Every build write and evidence decision reaches the index at once through this hook; once the
  // index is in step, a build that became a verified build is announced to the saved searches it matches.
  // The announcement row is unique per search and build, so every instance that sees the change may
  // try: one writes it and queues the mail, the others find it written.
  const bringInStep = async (buildId: number) => {
    await syncBuild(db, readUploadText, buildId)
    // The search page renders from this index: a page rendered and cached while it was still catching
    // up (after the first drop, before this sync) goes now (server/plugins/page-cache.ts).
    await invalidatePublicCache()
    try {
      await announceBuild(db, await useSearchIndex(), buildId, siteOrigin())
    }
    catch (err) {
      console.error(`saved searches: build ${buildId} could not be announced; the change itself stands`, err)
    }
  }
  onBuildChanged(bringInStep)
  // The feed's position is taken before the index is built (its last settled row), so a change committed during the build is read again after it.
  let feed: FeedReader | null = null
  let building = true
  const startFeed = async () => {
    const head = await feedStart(db)
    return { head, built: await rebuildIndex(db, readUploadText) }
  }
  startFeed().then(
    ({ head, built }) => {
      building = false
      feed = createFeedReader(db, head)
      console.log(`search: index of ${built.documents} published builds built in ${built.ms} ms; change feed from position ${head}`)
    },
    (err) => {
      building = false
      if (!noteDatabaseOutage(err, 'search: building the index (the consistency check will retry)')) console.error('search: the index could not be built from MariaDB; the consistency check will retry', err)
    },
  )
  // Other instances' writes reach this index through the feed, a few times a second; a poll waits for the one before.
  let stopped = false
  let feedTimer: ReturnType<typeof setTimeout> | undefined
  const tail = async () => {
    try {
      // When the first build failed the feed starts at the head now; the consistency check fills the gap.
      if (!feed && !building) feed = createFeedReader(db, await feedStart(db))
      if (feed) {
        const changed = await feed.poll()
        // Another instance's change also drops this instance's cached public answers (server/utils/public-cache.ts).
        if (changed.length > 0) await invalidatePublicCache()
        for (const buildId of changed) await bringInStep(buildId)
      }
    }
    catch (err) {
      if (!noteDatabaseOutage(err, 'search: reading the change feed')) console.error('search: reading the change feed failed', err)
    }
    if (!stopped) {
      feedTimer = setTimeout(tail, FEED_EVERY_MS)
      feedTimer.unref()
    }
  }
  if (FEED_EVERY_MS > 0) {
    feedTimer = setTimeout(tail, FEED_EVERY_MS)
    feedTimer.unref()
  }
  const timer = setInterval(() => {
    checkIndex(db, readUploadText).then((r) => {
      if (r.added + r.updated + r.removed > 0) console.warn(`search: repaired drift (${r.added} added, ${r.updated} updated, ${r.removed} removed)`)
    }, (err) => {
      if (!noteDatabaseOutage(err, 'search: the consistency check')) console.error('search: consistency check failed', err)
    })
    pruneFeed(db).catch(err => noteDatabaseOutage(err, 'search: pruning the change feed') || console.error('search: pruning the change feed failed', err))
  }, CHECK_EVERY_MS)
  timer.unref()
  nitroApp.hooks.hook('close', () => {
    stopped = true
    clearTimeout(feedTimer)
    clearInterval(timer)
  })
})
