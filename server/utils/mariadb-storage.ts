// An unstorage driver that keeps files as rows of stored_files: with it the uploads replicate with
// the rest of the data, so every server instance on a Galera cluster reads every upload. The uploads
// mount takes it when NUXT_UPLOADS_DRIVER=mariadb (server/plugins/storage.ts); the default stays the
// folder under the data folder, for one machine.
import { asc, eq, like } from 'drizzle-orm'
import { defineDriver } from 'unstorage'
import { storedFiles } from '../database/schema'
import type { Database } from '../database/types'

export interface MariadbStorageOptions {
  /** The database client, asked for at each call (the pool may be made after the mount). */
  db: () => Database
}

/** LIKE's own characters in a key prefix, escaped (MariaDB's default escape character is the backslash). */
const likePrefix = (base: string) => `${base.replace(/[\\%_]/g, c => `\\${c}`)}%`

const toBuffer = (value: unknown): Buffer => {
  if (Buffer.isBuffer(value)) return value
  if (value instanceof Uint8Array) return Buffer.from(value.buffer, value.byteOffset, value.byteLength)
  if (typeof value === 'string') return Buffer.from(value, 'utf8')
  throw new TypeError('The uploads storage keeps bytes or text only.')
}

/** Files as rows of MariaDB's stored_files table, keyed by the storage key. */
export const mariadbStorage = defineDriver((opts: MariadbStorageOptions) => {
  const read = async (key: string): Promise<Buffer | null> => {
    const [row] = await opts.db().select({ body: storedFiles.body }).from(storedFiles).where(eq(storedFiles.storageKey, key)).limit(1)
    return row ? toBuffer(row.body) : null
  }
  const write = async (key: string, value: unknown) => {
    const body = toBuffer(value)
    await opts.db().insert(storedFiles).values({ storageKey: key, body, sizeBytes: body.length })
      .onDuplicateKeyUpdate({ set: { body, sizeBytes: body.length, updatedAt: new Date() } })
  }
  return {
    name: 'mariadb',
    options: opts,
    async hasItem(key) {
      const [row] = await opts.db().select({ key: storedFiles.storageKey }).from(storedFiles).where(eq(storedFiles.storageKey, key)).limit(1)
      return row !== undefined
    },
    async getItem(key) {
      return (await read(key))?.toString('utf8') ?? null
    },
    getItemRaw: read,
    setItem: write,
    setItemRaw: write,
    async removeItem(key) {
      await opts.db().delete(storedFiles).where(eq(storedFiles.storageKey, key))
    },
    async getKeys(base) {
      const rows = await opts.db().select({ key: storedFiles.storageKey }).from(storedFiles)
        .where(base ? like(storedFiles.storageKey, likePrefix(base)) : undefined).orderBy(asc(storedFiles.storageKey))
      return rows.map(r => r.key)
    },
    async clear(base) {
      await opts.db().delete(storedFiles).where(base ? like(storedFiles.storageKey, likePrefix(base)) : undefined)
    },
  }
})
