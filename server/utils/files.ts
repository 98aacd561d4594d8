// The file service: where an upload is vetted (empty 422, size 413, sniffed type 415), how its name is
// cleaned, how it is stored and read back, and the headers it is served under. Build uploads (photos,
// pulls, sheets) and deal files alike go through it; the body reading and sniffing are in uploads.ts,
// and the Nitro side (the uploads mount, answering with a stored file) in stored-files.ts.
import contentDisposition from 'content-disposition'
import { createError } from 'h3'
import { asciiFileName, singleLine } from '../../shared/text/plain'
import { wholeMegabytes } from '../../shared/uploads'
import { sniffUpload, UPLOAD_LIMITS, type UploadKind } from './uploads'

/** The part of Nitro's storage layer the file service uses (a plain unstorage instance in tests). */
export interface UploadStore {
  setItemRaw(key: string, value: Uint8Array): Promise<void>
  getItemRaw(key: string): Promise<unknown>
  removeItem(key: string): Promise<void>
  hasItem(key: string): Promise<boolean>
}

/** One uploaded file as the route read it. */
export interface IncomingFile {
  bytes: Buffer
  name: string
}

/** Empty (422), size (413) and sniffed type (415) of one file, before anything is stored. Returns the sniffed MIME type. */
export async function vetUpload(kind: UploadKind, file: IncomingFile, what: string): Promise<string> {
  if (file.bytes.length === 0) throw createError({ status: 422, message: `The ${what} is empty.` })
  if (file.bytes.length > UPLOAD_LIMITS[kind]) {
    throw createError({ status: 413, message: `The ${what} is ${(file.bytes.length / 1024 / 1024).toFixed(1)} MB; the most it may be is ${wholeMegabytes(UPLOAD_LIMITS[kind])}.` })
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

/**
 * The Content-Disposition of a download under a person's file name in any script: an ASCII `filename`
 * for old clients and the exact name as RFC 8187 `filename*` (RFC 6266 §4.3), through the
 * content-disposition package. Control characters are dropped so the header can never break.
 */
export function attachmentDisposition(name: string): string {
  const clean = singleLine(name).replace(/[/\\]/g, '_') || 'file'
  return contentDisposition(clean, { type: 'attachment', fallback: asciiFileName(clean) })
}

/** A stored file's bytes, or null when storage no longer holds it: the one reader of the uploads mount. */
export async function readStored(store: UploadStore, storageKey: string): Promise<Buffer | null> {
  const value = await store.getItemRaw(storageKey)
  if (value === null || value === undefined) return null
  if (typeof value === 'string') return Buffer.from(value, 'utf8')
  return Buffer.isBuffer(value) ? value : Buffer.from(value as Uint8Array)
}
