import { PULL_MAX_PREAMBLE_ROWS, PULL_MAX_ROWS } from './engine/limits'

/** Size limits per kind of upload, in bytes: the server enforces them (413), the pages check before sending. */
export const UPLOAD_LIMITS = {
  pull: 2 * 1024 * 1024,
  sheet: 10 * 1024 * 1024,
  photo: 8 * 1024 * 1024,
  attachment: 10 * 1024 * 1024,
  proof: 10 * 1024 * 1024,
} as const

export type UploadKind = keyof typeof UPLOAD_LIMITS

/** What the file pickers offer (the server sniffs the content whatever the picker allowed). */
export const UPLOAD_ACCEPT: Record<'pull' | 'sheet' | 'photo', string> = {
  pull: '.csv,.tsv,.txt,text/csv,text/tab-separated-values,text/plain',
  sheet: 'image/png,image/jpeg,image/webp,application/pdf',
  photo: 'image/png,image/jpeg,image/webp',
}

/** Bytes as a person reads them: 1.4 MB, 820 KB, 512 B. */
export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(0)} KB`
  return `${(bytes / 1024 / 1024).toFixed(1)} MB`
}

/** A size limit in whole megabytes, as the server's refusals name it: "8 MB". */
export function wholeMegabytes(bytes: number): string {
  return `${(bytes / 1024 / 1024).toFixed(0)} MB`
}

/** Most data rows a pull file may hold: the parser's bound (shared/engine/limits.ts), refused with 422 by the server. */
export { PULL_MAX_ROWS }

/**
 * True when a pull file's text certainly holds more data rows than the parser accepts: more
 * non-blank lines than the row bound plus a header, a line of units and the skippable lines above
 * the header. The page refuses such a file before sending it; the server counts exactly.
 */
export function pullTextOverRowBound(text: string): boolean {
  const limit = PULL_MAX_ROWS + PULL_MAX_PREAMBLE_ROWS + 2
  let lines = 0
  let start = 0
  for (let i = 0; i <= text.length; i++) {
    const c = i < text.length ? text.charCodeAt(i) : 10
    if (c !== 10 && c !== 13) continue
    if (text.slice(start, i).trim() !== '') lines++
    if (lines > limit) return true
    start = i + 1
  }
  return false
}
