// Files sent with a deal: request attachments, message attachments, proof of work and delivery
// pulls. Stored through the uploads storage, size-limited, type-sniffed and hashed; each file is
// attached once, and can be read only by the parties of the request it belongs to.
import { createHash, randomUUID } from 'node:crypto'
import { and, eq, inArray, isNull, or } from 'drizzle-orm'
import { fileTypeFromBuffer } from 'file-type'
import { createError } from 'h3'
import type { Storage } from 'unstorage'
import {
  deliveryPulls, files, milestoneProofs, milestones, orders, quoteRequests, requestAttachments, type StoredFile,
} from '../database/schema'
import { type DealActor, type Executor, requestVisibleTo, unprocessable } from './deal-context'

export const FILE_LIMITS = { bytes: 10 * 1024 * 1024, pullBytes: 2 * 1024 * 1024 } as const

export type DealFileKind = 'attachment' | 'photo' | 'proof' | 'pull'

const BINARY_TYPES = new Set(['image/jpeg', 'image/png', 'image/webp', 'image/gif', 'application/pdf'])

/** What a file really is, from its bytes: an image or PDF by signature, otherwise UTF-8 text without NULs. */
export async function sniffType(data: Uint8Array, name: string): Promise<string | null> {
  const found = await fileTypeFromBuffer(data)
  if (found) return BINARY_TYPES.has(found.mime) ? found.mime : null
  if (data.includes(0)) return null
  try {
    new TextDecoder('utf-8', { fatal: true }).decode(data)
  }
  catch {
    return null
  }
  return /\.(csv|tsv)$/i.test(name) ? 'text/csv' : 'text/plain'
}

export interface UploadedFile {
  id: number
  name: string
  mime: string
  sizeBytes: number
}

/** Stores one upload for its owner and records it; refuses what is too large or of a kind the deal does not take. */
export async function storeDealFile(db: Executor, storage: Storage, ownerId: number, upload: { name: string, data: Uint8Array, kind: DealFileKind }): Promise<UploadedFile> {
  const limit = upload.kind === 'pull' ? FILE_LIMITS.pullBytes : FILE_LIMITS.bytes
  if (upload.data.byteLength === 0) throw createError({ status: 400, message: 'The file is empty.' })
  if (upload.data.byteLength > limit) throw createError({ status: 413, message: `The file is larger than ${limit / 1024 / 1024} MB.` })
  const mime = await sniffType(upload.data, upload.name)
  if (!mime) throw createError({ status: 415, message: 'Send a photo (JPEG, PNG, WebP, GIF), a PDF, or a text or CSV file.' })
  if (upload.kind === 'pull' && !mime.startsWith('text/')) throw createError({ status: 415, message: 'A pull file is a text file: export the pull as CSV or tab-separated text.' })
  if (upload.kind === 'photo' && !mime.startsWith('image/')) throw createError({ status: 415, message: 'A photo is a JPEG, PNG, WebP or GIF image.' })
  const sha256 = createHash('sha256').update(upload.data).digest('hex')
  const storageKey = `deals/${ownerId}/${randomUUID()}`
  await storage.setItemRaw(storageKey, Buffer.from(upload.data))
  const name = upload.name.replace(/[\\/\0]/g, '_').slice(0, 255) || 'file'
  const [row] = await db.insert(files).values({ ownerId, kind: upload.kind, mime, sizeBytes: upload.data.byteLength, sha256, storageKey, originalName: name }).$returningId()
  return { id: row!.id, name, mime, sizeBytes: upload.data.byteLength }
}

/** Checks that files are the user's own uploads of the given kinds and not yet attached anywhere; answers their ids. */
export async function claimFiles(tx: Executor, ownerId: number, ids: number[], kinds: readonly DealFileKind[]): Promise<number[]> {
  const unique = [...new Set(ids)]
  if (unique.length === 0) return []
  const rows = await tx.select({ id: files.id, kind: files.kind }).from(files)
    .leftJoin(requestAttachments, eq(requestAttachments.fileId, files.id))
    .leftJoin(milestoneProofs, eq(milestoneProofs.fileId, files.id))
    .leftJoin(deliveryPulls, eq(deliveryPulls.fileId, files.id))
    .where(and(inArray(files.id, unique), eq(files.ownerId, ownerId), isNull(requestAttachments.id), isNull(milestoneProofs.id), isNull(deliveryPulls.id)))
  const usable = new Set(rows.filter(r => (kinds as readonly string[]).includes(r.kind)).map(r => r.id))
  const missing = unique.filter(id => !usable.has(id))
  if (missing.length > 0) throw unprocessable(`File ${missing.join(', ')} is not one of your uploads of the right kind, or it is already attached elsewhere. Upload it again.`)
  return unique
}

/** A stored file the actor may read: their own upload, or one attached to a deal they are a party to. */
export async function readableFile(db: Executor, actor: DealActor, fileId: number): Promise<StoredFile | null> {
  const [own] = await db.select().from(files).where(and(eq(files.id, fileId), eq(files.ownerId, actor.id))).limit(1)
  if (own) return own
  const [attached] = await db.select({ file: files }).from(files)
    .innerJoin(requestAttachments, eq(requestAttachments.fileId, files.id))
    .innerJoin(quoteRequests, eq(quoteRequests.id, requestAttachments.requestId))
    .where(and(eq(files.id, fileId), requestVisibleTo(actor))).limit(1)
  if (attached) return attached.file
  const [proof] = await db.select({ file: files }).from(files)
    .leftJoin(milestoneProofs, eq(milestoneProofs.fileId, files.id))
    .leftJoin(deliveryPulls, eq(deliveryPulls.fileId, files.id))
    .innerJoin(milestones, or(eq(milestones.id, milestoneProofs.milestoneId), eq(milestones.id, deliveryPulls.milestoneId)))
    .innerJoin(orders, eq(orders.id, milestones.orderId))
    .innerJoin(quoteRequests, eq(quoteRequests.id, orders.requestId))
    .where(and(eq(files.id, fileId), requestVisibleTo(actor))).limit(1)
  return proof?.file ?? null
}
