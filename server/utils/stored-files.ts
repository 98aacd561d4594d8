// The Nitro side of the file service (server/utils/files.ts): the uploads mount, and answering a request
// with a stored file, shown in place or as a download. Every read goes through `readStored`.
import { createError, setResponseHeaders, type H3Event } from 'h3'
import { attachmentDisposition, readStored, type UploadStore } from './files'

/** The uploads mount as the services take it. */
export function uploadStore(): UploadStore {
  return useStorage('uploads') as unknown as UploadStore
}

/** Reads an uploaded file's text from the uploads mount. */
export async function readUploadText(storageKey: string): Promise<string | null> {
  return (await readStored(uploadStore(), storageKey))?.toString('utf8') ?? null
}

async function storedOr404(storageKey: string, message: string): Promise<Buffer> {
  const bytes = await readStored(uploadStore(), storageKey)
  if (!bytes) throw createError({ status: 404, message })
  return bytes
}

/** Answers with a stored file's bytes under its sniffed type, shown in place; 404 if storage has lost it. */
export async function sendStoredFile(event: H3Event, file: { storageKey: string, mime: string }): Promise<Buffer> {
  const bytes = await storedOr404(file.storageKey, 'That file is no longer stored.')
  setResponseHeaders(event, { 'content-type': file.mime, 'x-content-type-options': 'nosniff', 'cache-control': 'private, max-age=300' })
  return bytes
}

/** Answers with a stored file as a download under its original name; 404 when it is gone from storage. */
export async function sendStoredDownload(event: H3Event, file: { storageKey: string, name: string, mime: string }, options: { cacheControl?: string, charset?: boolean } = {}): Promise<Buffer> {
  const bytes = await storedOr404(file.storageKey, 'The stored file is missing.')
  const charset = options.charset ?? true
  setResponseHeaders(event, {
    'content-type': charset && file.mime.startsWith('text/') ? `${file.mime}; charset=utf-8` : file.mime,
    'content-disposition': attachmentDisposition(file.name),
    'x-content-type-options': 'nosniff',
    ...(options.cacheControl ? { 'cache-control': options.cacheControl } : {}),
  })
  return bytes
}
