import { inArray } from 'drizzle-orm'
import { files, type StoredFile } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import { cleanName, type IncomingFile, type UploadStore } from '../utils/files'
import { sha256, storageKeyFor, type UploadKind } from '../utils/uploads'

export { cleanName, vetUpload, type IncomingFile, type UploadStore } from '../utils/files'

export type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]

/** A file checked and written to storage, waiting for its row. */
export interface StagedFile {
  kind: UploadKind
  mime: string
  sizeBytes: number
  sha256: string
  storageKey: string
  originalName: string
}

/** Writes a vetted file to storage under a fresh key; the caller inserts its row or calls `discard`. */
export async function stage(store: UploadStore, kind: UploadKind, mime: string, file: IncomingFile): Promise<StagedFile> {
  const hash = sha256(file.bytes)
  const storageKey = storageKeyFor(kind, hash, mime)
  await store.setItemRaw(storageKey, file.bytes)
  return { kind, mime, sizeBytes: file.bytes.length, sha256: hash, storageKey, originalName: cleanName(file.name) }
}

/** The files row of a staged file, inside the caller's transaction. */
export async function insertFileRow(tx: Tx, ownerId: number, staged: StagedFile): Promise<number> {
  const [row] = await tx.insert(files).values({
    ownerId, kind: staged.kind, mime: staged.mime, sizeBytes: staged.sizeBytes, sha256: staged.sha256, storageKey: staged.storageKey, originalName: staged.originalName,
  }).$returningId()
  return row!.id
}

/**
 * Removes stored files by key. Runs after the rows are gone (or were never written); a failure is
 * logged and the rest still go, so one stuck file does not keep others.
 */
export async function discard(store: UploadStore, keys: string[]): Promise<void> {
  for (const key of keys) {
    try {
      await store.removeItem(key)
    }
    catch (error) {
      console.error(`[uploads] could not remove ${key}:`, error)
    }
  }
}

/** Deletes files rows by id inside a transaction and returns their storage keys for `discard` after commit. */
export async function deleteFileRows(tx: Tx, ids: number[]): Promise<string[]> {
  const unique = [...new Set(ids)]
  if (unique.length === 0) return []
  const rows: Pick<StoredFile, 'storageKey'>[] = await tx.select({ storageKey: files.storageKey }).from(files).where(inArray(files.id, unique))
  await tx.delete(files).where(inArray(files.id, unique))
  return rows.map(r => r.storageKey)
}

/**
 * Stages files, runs `write` in one transaction, and removes what was stored if the transaction fails.
 * The files are written once; the transaction alone is run again after a lock conflict (each run
 * inserts its rows afresh, so `write` must be safe to repeat, as every write here is).
 */
export async function withStagedFiles<T>(db: Database, store: UploadStore, items: { kind: UploadKind, mime: string, file: IncomingFile }[], write: (tx: Tx, staged: StagedFile[]) => Promise<T>): Promise<T> {
  const staged: StagedFile[] = []
  try {
    for (const item of items) staged.push(await stage(store, item.kind, item.mime, item.file))
    return await inRetriedTransaction(db, tx => write(tx, staged))
  }
  catch (error) {
    await discard(store, staged.map(s => s.storageKey))
    throw error
  }
}
