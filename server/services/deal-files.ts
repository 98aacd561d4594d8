// Files sent with a deal: request attachments, message attachments, proof of work and delivery
// pulls. The route reads and vets the upload (server/utils/files.ts); here it is stored
// and recorded, attached once, and readable only by the parties of the request it belongs to.
import { and, eq, inArray, isNull, or } from 'drizzle-orm'
import {
  deliveryPulls, files, milestoneProofs, milestones, orders, quoteRequests, requestAttachments, type StoredFile,
} from '../database/schema'
import { cleanName, type UploadStore } from '../utils/files'
import { type DealActor, type Executor, requestVisibleTo, unprocessable } from './deal-context'

export type DealFileKind = 'attachment' | 'photo' | 'proof' | 'pull'

export interface UploadedFile {
  id: number
  name: string
  mime: string
  sizeBytes: number
}

/** Stores an upload that was already limited and sniffed, and records it for its owner. */
export async function storeDealFile(db: Executor, storage: UploadStore, ownerId: number, upload: { name: string, bytes: Buffer, mime: string, sha256: string, storageKey: string, kind: DealFileKind }): Promise<UploadedFile> {
  await storage.setItemRaw(upload.storageKey, upload.bytes)
  const name = cleanName(upload.name)
  const [row] = await db.insert(files).values({
    ownerId, kind: upload.kind, mime: upload.mime, sizeBytes: upload.bytes.byteLength, sha256: upload.sha256, storageKey: upload.storageKey, originalName: name,
  }).$returningId()
  return { id: row!.id, name, mime: upload.mime, sizeBytes: upload.bytes.byteLength }
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
