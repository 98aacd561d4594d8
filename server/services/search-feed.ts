// The change feed that keeps every server instance's search index in step. A write that changes a
// build adds a row to build_changes inside its own transaction; every instance reads the rows past its
// position a few times a second and brings those builds' entries in step (server/plugins/search.ts).
// The consistency check (checkIndex, every TW_SEARCH_CHECK_MS) stays as the safety net.
import { asc, gt, lt, max, sql } from 'drizzle-orm'
import { buildChanges } from '../database/schema'
import type { Database } from '../database/types'
import type { Executor } from './deal-context'

/** A feed row older than this (by MariaDB's clock) is settled: no smaller position can still commit (common practice: well past any transaction's length). */
const SETTLE_MS = 10_000
const settleSecondsOf = (ms: number) => Math.max(1, Math.ceil(ms / 1000))

/** Adds a build's change to the feed. Call it inside the transaction that makes the change, as its last write. */
export async function recordBuildChange(tx: Executor, buildId: number): Promise<void> {
  await tx.insert(buildChanges).values({ buildId })
}

/** Adds the changes of several builds to the feed in one write (a shop's rename touches all of its builds). */
export async function recordBuildChanges(tx: Executor, buildIds: readonly number[]): Promise<void> {
  if (buildIds.length > 0) await tx.insert(buildChanges).values(buildIds.map(buildId => ({ buildId })))
}

/** The feed's last position now (0 when it is empty): a reader that built its index after this starts here. */
export async function feedHead(db: Database): Promise<number> {
  const [row] = await db.select({ head: max(buildChanges.id) }).from(buildChanges)
  return Number(row?.head ?? 0)
}

/**
 * Where a reader that is about to build its index starts: the last settled position (see
 * createFeedReader), so a change still committing when the index is read is read again from the feed.
 */
export async function feedStart(db: Database, settleMs = SETTLE_MS): Promise<number> {
  const [row] = await db.select({ head: max(buildChanges.id) }).from(buildChanges)
    .where(lt(buildChanges.createdAt, sql`NOW(3) - INTERVAL ${sql.raw(String(settleSecondsOf(settleMs)))} SECOND`))
  return Number(row?.head ?? 0)
}

/** Removes feed rows older than `days` (every reader is long past them), a bounded batch at a time. */
export async function pruneFeed(db: Database, days = 1): Promise<number> {
  const [result] = await db.delete(buildChanges)
    .where(lt(buildChanges.createdAt, sql`NOW(3) - INTERVAL ${sql.raw(String(Math.max(1, Math.floor(days))))} DAY`)).limit(5000)
  return result.affectedRows
}

export interface FeedReaderOptions {
  /** A row older than this (by MariaDB's clock) is taken as settled: no smaller position can still commit. */
  settleMs?: number
  /** Most rows read per poll. */
  batch?: number
}

export interface FeedReader {
  /** Every position at or below it has been read. */
  readonly floor: number
  /** The builds changed since the last poll, each once, in the order their changes were first seen. */
  poll: () => Promise<number[]>
}

/**
 * A reader of the feed from `start`. Positions are AUTO_INCREMENT values handed out at insert and seen
 * at commit, so a smaller one can become visible after a larger one (a longer transaction, or on a
 * Galera cluster another node's interleaved positions). The reader therefore keeps a floor below which
 * every row is settled and remembers which rows above it it has already read, so none is missed and
 * none is applied twice.
 */
export function createFeedReader(db: Database, start: number, opts: FeedReaderOptions = {}): FeedReader {
  const settleSeconds = settleSecondsOf(opts.settleMs ?? SETTLE_MS)
  const batch = opts.batch ?? 5000
  let floor = start
  const seen = new Set<number>()
  return {
    get floor() {
      return floor
    },
    async poll() {
      const rows = await db.select({
        id: buildChanges.id,
        buildId: buildChanges.buildId,
        settled: sql<number>`${buildChanges.createdAt} < NOW(3) - INTERVAL ${sql.raw(String(settleSeconds))} SECOND`,
      }).from(buildChanges).where(gt(buildChanges.id, floor)).orderBy(asc(buildChanges.id)).limit(batch)
      const changed = new Set<number>()
      for (const row of rows) {
        if (seen.has(row.id)) continue
        seen.add(row.id)
        changed.add(row.buildId)
      }
      // The floor moves over the settled rows at the front; nothing below it can appear any more.
      for (const row of rows) {
        if (!Number(row.settled)) break
        floor = row.id
      }
      for (const id of seen) if (id <= floor) seen.delete(id)
      return [...changed]
    },
  }
}
