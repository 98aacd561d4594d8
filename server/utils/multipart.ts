import { createError, getRequestHeader, type H3Event } from 'h3'
import type { z } from 'zod'
import { readLimitedBody } from './uploads'
import { validator } from './validate'

/** One file part of a multipart body. */
export interface FormFile {
  bytes: Buffer
  name: string
}

export interface UploadForm {
  fields: Record<string, string>
  files: Record<string, FormFile>
}

/**
 * Reads a multipart/form-data body of at most `limit` bytes (413 beyond it, before anything is
 * parsed or stored), then splits it into text fields and file parts. 400 for anything else.
 */
export async function readUploadForm(event: H3Event, limit: number): Promise<UploadForm> {
  const type = getRequestHeader(event, 'content-type') ?? ''
  if (!/^multipart\/form-data;\s*boundary=/i.test(type)) {
    throw createError({ status: 400, message: 'Send the upload as multipart/form-data (a form with a file field).' })
  }
  const body = await readLimitedBody(event, limit)
  let form: FormData
  try {
    form = await new Response(new Uint8Array(body), { headers: { 'content-type': type } }).formData()
  }
  catch {
    throw createError({ status: 400, message: 'The upload could not be read as a form; try sending it again.' })
  }
  const fields: Record<string, string> = {}
  const files: Record<string, FormFile> = {}
  for (const [key, value] of form.entries()) {
    if (typeof value === 'string') fields[key] = value
    else files[key] = { bytes: Buffer.from(await value.arrayBuffer()), name: value.name }
  }
  return { fields, files }
}

/** A JSON text field of an upload form checked with a zod schema: 400 naming each bad field. */
export function formJson<S extends z.ZodType>(form: UploadForm, field: string, schema: S): z.infer<S> {
  const raw = form.fields[field]
  if (raw === undefined) throw createError({ status: 400, message: `The form needs a "${field}" field.` })
  let value: unknown
  try {
    value = JSON.parse(raw)
  }
  catch {
    throw createError({ status: 400, message: `The "${field}" field is not valid JSON.` })
  }
  return validator(schema)(value)
}

/** Room for the form's boundaries, headers and text fields beside the files themselves. */
export const FORM_OVERHEAD_BYTES = 64 * 1024

/** A file part the form must carry: 400 naming it when absent. */
export function requireFormFile(form: UploadForm, field: string, what: string): FormFile {
  const file = form.files[field]
  if (!file) throw createError({ status: 400, message: `The form needs ${what} in a "${field}" field.` })
  return file
}
