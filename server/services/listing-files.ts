import { createError } from 'h3'
import { inArray } from 'drizzle-orm'
import { files, type StoredFile } from '../database/schema'
import type { Database } from '../database/types'
import { inRetriedTransaction } from '../utils/transaction'
import { sha256, sniffUpload, storageKeyFor, UPLOAD_LIMITS, type UploadKind } from '../utils/uploads'

/** The part of Nitro's storage layer the listing editor uses (a plain unstorage instance in tests). */
export interface UploadStore {
  setItemRaw(key: string, value: Uint8Array): Promise<void>
  getItemRaw(key: string): Promise<unknown>
  removeItem(key: string): Promise<void>
  hasItem(key: string): Promise<boolean>
}

export type Tx = Parameters<Parameters<Database['transaction']>[0]>[0]

/** One uploaded file as the route read it. */
export interface IncomingFile {
  bytes: Buffer
  name: string
}

/** A file checked and written to storage, waiting for its row. */
export interface StagedFile {
  kind: UploadKind
  mime: string
  sizeBytes: number
  sha256: string
  storageKey: string
  originalName: string
}

const mb = (bytes: number) => `${(bytes / 1024 / 1024).toFixed(0)} MB`

/** Size (413) and sniffed type (415) of one file, before anything is stored. Returns the sniffed MIME type. */
export async function vetUpload(kind: UploadKind, file: IncomingFile, what: string): Promise<string> {
  if (file.bytes.length === 0) throw createError({ status: 422, message: `The ${what} is empty.` })
  if (file.bytes.length > UPLOAD_LIMITS[kind]) {
    throw createError({ status: 413, message: `The ${what} is ${(file.bytes.length / 1024 / 1024).toFixed(1)} MB; the most it may be is ${mb(UPLOAD_LIMITS[kind])}.` })
  }
  return sniffUpload(kind, file.bytes)
}

/** A file name safe to keep for display: no folders, no control characters, at most 255 characters. */
export function cleanName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? ''
  // eslint-disable-next-line no-control-regex -- control characters are what this strips
  const clean = base.replace(/[\u0000-\u001f\u007f]/g, '').trim().slice(0, 255)
  return clean || 'upload'
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
