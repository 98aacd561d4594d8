import contentDisposition from 'content-disposition'
import { asciiFileName, singleLine } from '#shared/text/plain'

/**
 * The Content-Disposition of a download under a person's file name in any script: an ASCII `filename`
 * for old clients and the exact name as RFC 8187 `filename*` (RFC 6266 §4.3), through the
 * content-disposition package. Control characters are dropped so the header can never break.
 */
export function attachmentDisposition(name: string): string {
  const clean = singleLine(name).replace(/[/\\]/g, '_') || 'file'
  return contentDisposition(clean, { type: 'attachment', fallback: asciiFileName(clean) })
}
