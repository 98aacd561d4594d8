// One place that runs a transaction again when MariaDB rolled it back to break a lock conflict: a
// deadlock victim (ER_LOCK_DEADLOCK, 1213), a lock wait that timed out (ER_LOCK_WAIT_TIMEOUT, 1205),
// and, on a Galera cluster, a conflicting commit on another node, which is reported with the same
// deadlock error at COMMIT. Only transactions that can be run again from the start belong here: every
// write inside rolls back with them, and a call to the payment service inside carries an idempotency
// key, so the second run finds what the first one did and does nothing twice.
import type { Database } from '../database/types'

/** MariaDB's error numbers for a transaction that lost a lock conflict and was rolled back. */
export const LOCK_CONFLICT_ERRNOS: readonly number[] = [1213, 1205]
const LOCK_CONFLICT_CODES: readonly string[] = ['ER_LOCK_DEADLOCK', 'ER_LOCK_WAIT_TIMEOUT']

export interface RetryOptions {
  /** Runs in all, the first included (4: up to three retries). */
  attempts?: number
  /** The wait before the n-th retry is about baseDelayMs × 2^(n-1), with ±50 % jitter so the two losers do not meet again. */
  baseDelayMs?: number
  /** Told about each conflict that is retried (for logs and tests). */
  onRetry?: (error: unknown, attempt: number) => void
}

// Four runs: on a Galera cluster a hot row written through two nodes at once (a rate-limit bucket, a
// milestone) can lose certification more than once in a burst; the waits (about 15, 30, 60 ms) stay short.
const DEFAULTS = { attempts: 4, baseDelayMs: 15 }

/** True when the error (or one it wraps, as drizzle does) is a lock conflict that rolled the transaction back. */
export function isLockConflict(error: unknown): boolean {
  const seen = new Set<unknown>()
  for (let e: unknown = error; e && typeof e === 'object' && !seen.has(e); e = (e as { cause?: unknown }).cause) {
    seen.add(e)
    const { errno, code } = e as { errno?: unknown, code?: unknown }
    if (typeof errno === 'number' && LOCK_CONFLICT_ERRNOS.includes(errno)) return true
    if (typeof code === 'string' && LOCK_CONFLICT_CODES.includes(code)) return true
  }
  return false
}

const sleep = (ms: number) => new Promise<void>(resolve => setTimeout(resolve, ms))

/**
 * Runs `work` and runs it again, up to `attempts` runs in all, while it fails with a lock conflict;
 * any other error, or the last conflict, is thrown as it came. `work` must start its own transaction
 * (the whole transaction is retried, never a statement inside one).
 */
export async function retryOnLockConflict<T>(work: () => Promise<T>, options: RetryOptions = {}): Promise<T> {
  const attempts = Math.max(1, options.attempts ?? DEFAULTS.attempts)
  const base = options.baseDelayMs ?? DEFAULTS.baseDelayMs
  for (let attempt = 1; ; attempt++) {
    try {
      return await work()
    }
    catch (error) {
      if (attempt >= attempts || !isLockConflict(error)) throw error
      options.onRetry?.(error, attempt)
      await sleep(base * 2 ** (attempt - 1) * (0.5 + Math.random()))
    }
  }
}

type Transaction = Parameters<Parameters<Database['transaction']>[0]>[0]

/** `db.transaction(fn)`, run again from the start when it loses a lock conflict (see retryOnLockConflict). */
export function inRetriedTransaction<T>(db: Database, fn: (tx: Transaction) => Promise<T>, options?: RetryOptions): Promise<T> {
  return retryOnLockConflict(() => db.transaction(fn), options)
}
