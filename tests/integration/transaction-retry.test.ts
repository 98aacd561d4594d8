// The retry of a transaction that lost a lock conflict (server/utils/transaction.ts), against the real
// MariaDB: a deadlock made on purpose between two transactions that lock the same two rows in opposite
// orders (the victim is rolled back with ER_LOCK_DEADLOCK 1213, MariaDB's documented answer), and a lock
// wait that times out (ER_LOCK_WAIT_TIMEOUT 1205). Other errors are thrown at once.
import { randomUUID } from 'node:crypto'
import { eq, inArray, sql } from 'drizzle-orm'
import { drizzle } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import type { Database } from '../../server/database/types'
import type { DealContext } from '../../server/services/deal-context'
import { createRequest } from '../../server/services/deals'
import { inRetriedTransaction, isLockConflict, retryOnLockConflict } from '../../server/utils/transaction'
import { PEOPLE, actorByEmail, dealTestContext, requestInput, schema } from '../support/deals'

let ctx: DealContext
let close: () => Promise<void>
beforeAll(async () => {
  ({ ctx, close } = await dealTestContext())
})
afterAll(async () => {
  await close()
})

const errnoOf = (error: unknown): number | undefined => {
  for (let e: unknown = error; e && typeof e === 'object'; e = (e as { cause?: unknown }).cause) {
    const errno = (e as { errno?: unknown }).errno
    if (typeof errno === 'number') return errno
  }
  return undefined
}

async function twoRequests() {
  const racer = await actorByEmail(ctx.db, PEOPLE.racer)
  const a = await createRequest(ctx, racer, requestInput({ title: `Lock test A ${randomUUID().slice(0, 6)}`, targetHp: 600 }))
  const b = await createRequest(ctx, racer, requestInput({ title: `Lock test B ${randomUUID().slice(0, 6)}`, targetHp: 600 }))
  return [a.id, b.id] as const
}

const targets = async (ids: readonly number[]) =>
  (await ctx.db.select({ id: schema.quoteRequests.id, hp: schema.quoteRequests.targetHp }).from(schema.quoteRequests).where(inArray(schema.quoteRequests.id, [...ids])))
    .sort((x, y) => x.id - y.id).map(r => r.hp)

describe('a transaction that loses a lock conflict', () => {
  it('is run again when MariaDB picks it as a deadlock victim, and both transactions commit once', async () => {
    const [a, b] = await twoRequests()
    // Each transaction locks its first row, waits until the other holds its own, then asks for the other's.
    let holding = 0
    let bothHold!: () => void
    const met = new Promise<void>((resolve) => {
      bothHold = resolve
    })
    const runs = { ab: 0, ba: 0 }
    const retried: unknown[] = []
    const bump = (db: Database | Parameters<Parameters<Database['transaction']>[0]>[0], id: number) =>
      db.update(schema.quoteRequests).set({ targetHp: sql`${schema.quoteRequests.targetHp} + 1` }).where(eq(schema.quoteRequests.id, id))
    const cross = (first: number, second: number, key: 'ab' | 'ba') => inRetriedTransaction(ctx.db, async (tx) => {
      const run = ++runs[key]
      await bump(tx, first)
      if (run === 1) {
        if (++holding === 2) bothHold()
        await met
      }
      await bump(tx, second)
      return run
    }, { onRetry: error => retried.push(error) })

    const [ab, ba] = await Promise.all([cross(a, b, 'ab'), cross(b, a, 'ba')])
    expect(retried).toHaveLength(1)
    expect(errnoOf(retried[0])).toBe(1213)
    expect(isLockConflict(retried[0])).toBe(true)
    // One ran once, the victim twice; each committed exactly once, so each row went up by two.
    expect([ab, ba].sort()).toEqual([1, 2])
    expect(runs.ab + runs.ba).toBe(3)
    expect(await targets([a, b])).toEqual([602, 602])
  })

  it('is run again after a lock wait timeout, once the row is free', async () => {
    const [a] = await twoRequests()
    const holder = await mysql.createConnection({ uri: inject('databaseUrl'), timezone: 'Z' })
    const waiter = await mysql.createConnection({ uri: inject('databaseUrl'), timezone: 'Z' })
    try {
      await holder.beginTransaction()
      await holder.query('SELECT id FROM quote_requests WHERE id = ? FOR UPDATE', [a])
      await waiter.query('SET SESSION innodb_lock_wait_timeout = 1')
      const db = drizzle(waiter, { schema, mode: 'default' }) as unknown as Database
      const retried: unknown[] = []
      let runs = 0
      let released: Promise<void> | undefined
      await inRetriedTransaction(db, async (tx) => {
        runs++
        await tx.update(schema.quoteRequests).set({ targetHp: 700 }).where(eq(schema.quoteRequests.id, a))
      }, {
        onRetry: (error) => {
          retried.push(error)
          released = holder.commit()
        },
      })
      await released
      expect(runs).toBe(2)
      expect(retried.map(errnoOf)).toEqual([1205])
      expect(await targets([a])).toEqual([700])
    }
    finally {
      await holder.end()
      await waiter.end()
    }
  })

  it('is not run again for any other error: a duplicate key (1062) or an error of its own', async () => {
    let runs = 0
    const eventId = `evt_retry_${randomUUID()}`
    const duplicate = inRetriedTransaction(ctx.db, async (tx) => {
      runs++
      await tx.insert(schema.stripeEvents).values({ eventId, type: 'test', outcome: 'first', processedAt: new Date() })
      await tx.insert(schema.stripeEvents).values({ eventId, type: 'test', outcome: 'second', processedAt: new Date() })
    }, { attempts: 3 })
    const error = await duplicate.then(() => null, (e: unknown) => e)
    expect(errnoOf(error)).toBe(1062)
    expect(isLockConflict(error)).toBe(false)
    expect(runs).toBe(1)
    expect(await ctx.db.select().from(schema.stripeEvents).where(eq(schema.stripeEvents.eventId, eventId))).toHaveLength(0)

    let calls = 0
    await expect(retryOnLockConflict(async () => {
      calls++
      throw new Error('the payment service is away')
    }, { attempts: 3 })).rejects.toThrow('the payment service is away')
    expect(calls).toBe(1)
  })

  it('gives up after the runs it was allowed, with the last conflict', async () => {
    let calls = 0
    const conflict = Object.assign(new Error('Deadlock found when trying to get lock; try restarting transaction'), { errno: 1213, code: 'ER_LOCK_DEADLOCK' })
    const error = await retryOnLockConflict(async () => {
      calls++
      throw new Error('Failed query', { cause: conflict })
    }, { attempts: 2, baseDelayMs: 1 }).then(() => null, (e: unknown) => e)
    expect(calls).toBe(2)
    expect(errnoOf(error)).toBe(1213)
  })
})
