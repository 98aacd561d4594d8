import type { H3Event } from 'h3'

/** Reads an uploaded file's text from the 'uploads' storage mount. */
export async function readUploadText(storageKey: string): Promise<string | null> {
  const value = await useStorage('uploads').getItemRaw(storageKey)
  if (value === null || value === undefined) return null
  if (typeof value === 'string') return value
  return Buffer.from(value as Uint8Array).toString('utf8')
}

/** Answers with a stored upload as a download, under its original name; 404 when it is gone from storage. */
export async function sendStoredFile(event: H3Event, file: { storageKey: string, name: string, mime: string }): Promise<Buffer> {
  const value = await useStorage('uploads').getItemRaw(file.storageKey)
  if (value === null || value === undefined) throw createError({ status: 404, message: 'The stored file is missing.' })
  const bytes = typeof value === 'string' ? Buffer.from(value, 'utf8') : Buffer.from(value as Uint8Array)
  const safeName = file.name.replace(/[^\w.-]+/g, '_').slice(0, 120) || 'file'
  setResponseHeader(event, 'content-type', file.mime.startsWith('text/') ? `${file.mime}; charset=utf-8` : file.mime)
  setResponseHeader(event, 'content-disposition', `attachment; filename="${safeName}"`)
  setResponseHeader(event, 'x-content-type-options', 'nosniff')
  return bytes
}
