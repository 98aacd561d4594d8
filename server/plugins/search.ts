import { onBuildChanged } from '../services/listing-editor'
import { announceBuild } from '../services/saved-searches'
import { checkIndex, loadSyntheticIndex, rebuildIndex, syncBuild, useSearchIndex } from '../services/search'

/** How often the consistency check compares the index with MariaDB (TW_SEARCH_CHECK_MS, default five minutes). */
const CHECK_EVERY_MS = Number(process.env.TW_SEARCH_CHECK_MS) || 5 * 60_000

// Builds the search index from MariaDB at start, then keeps checking it against the database.
// The bench alone (TW_BENCH=1 with TW_SEARCH_SYNTHETIC=<count>) fills it with invented listings instead.
export default defineNitroPlugin((nitroApp) => {
  const synthetic = Number(process.env.TW_SEARCH_SYNTHETIC)
  if (process.env.TW_BENCH === '1' && synthetic > 0) {
    // Built once the server listens (building blocks the event loop), so the bench sees it start.
    setTimeout(() => {
      loadSyntheticIndex(synthetic).then(
        r => console.log(`search: bench index of ${r.documents} invented listings built in ${r.ms} ms`),
        err => console.error('search: the bench index failed to build', err),
      )
    }, 1000)
    return
  }
  if (!useRuntimeConfig().databaseUrl) return
  const db = useDb()
  // Every listing write and evidence decision reaches the index at once through this hook; once the
  // index is in step, a build that became a verified listing is announced to the saved searches it matches.
  onBuildChanged(async (buildId) => {
    await syncBuild(db, buildId)
    try {
      await announceBuild(db, await useSearchIndex(), buildId, siteOrigin())
    }
    catch (err) {
      console.error(`saved searches: build ${buildId} could not be announced; the change itself stands`, err)
    }
  })
  rebuildIndex(db).then(
    r => console.log(`search: index of ${r.documents} published builds built in ${r.ms} ms`),
    (err) => {
      if (!noteDatabaseOutage(err, 'search: building the index (the consistency check will retry)')) console.error('search: the index could not be built from MariaDB; the consistency check will retry', err)
    },
  )
  const timer = setInterval(() => {
    checkIndex(db).then((r) => {
      if (r.added + r.updated + r.removed > 0) console.warn(`search: repaired drift (${r.added} added, ${r.updated} updated, ${r.removed} removed)`)
    }, (err) => {
      if (!noteDatabaseOutage(err, 'search: the consistency check')) console.error('search: consistency check failed', err)
    })
  }, CHECK_EVERY_MS)
  timer.unref()
  nitroApp.hooks.hook('close', () => clearInterval(timer))
})
