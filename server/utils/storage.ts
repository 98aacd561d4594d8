import type { H3Event } from 'h3'
import { attachmentDisposition } from './download'
import type { UploadStore } from '../services/listing-files'

/** Reads an uploaded file's text from the 'uploads' storage mount. */
export async function readUploadText(storageKey: string): Promise<string | null> {
  const value = await useStorage('uploads').getItemRaw(storageKey)
  if (value === null || value === undefined) return null
  if (typeof value === 'string') return value
  return Buffer.from(value as Uint8Array).toString('utf8')
}

/** Answers with a stored file's bytes under its sniffed type; 404 if storage has lost it. */
export async function sendStoredFile(event: H3Event, file: { storageKey: string, mime: string }) {
  const value = await useStorage('uploads').getItemRaw(file.storageKey)
  if (value === null || value === undefined) throw createError({ status: 404, message: 'That file is no longer stored.' })
  setResponseHeaders(event, { 'content-type': file.mime, 'x-content-type-options': 'nosniff', 'cache-control': 'private, max-age=300' })
  return Buffer.isBuffer(value) ? value : Buffer.from(value as Uint8Array)
}

/** The uploads mount as the listing services take it. */
export function uploadStore(): UploadStore {
  return useStorage('uploads') as unknown as UploadStore
}

/** Answers with a stored upload as a download, under its original name; 404 when it is gone from storage. */
export async function sendStoredDownload(event: H3Event, file: { storageKey: string, name: string, mime: string }): Promise<Buffer> {
  const value = await useStorage('uploads').getItemRaw(file.storageKey)
  if (value === null || value === undefined) throw createError({ status: 404, message: 'The stored file is missing.' })
  const bytes = typeof value === 'string' ? Buffer.from(value, 'utf8') : Buffer.from(value as Uint8Array)
  setResponseHeader(event, 'content-type', file.mime.startsWith('text/') ? `${file.mime}; charset=utf-8` : file.mime)
  setResponseHeader(event, 'content-disposition', attachmentDisposition(file.name))
  setResponseHeader(event, 'x-content-type-options', 'nosniff')
  return bytes
}
