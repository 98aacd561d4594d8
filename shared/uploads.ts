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

/** Bytes as a person reads them: 1.4 MB, 820 KB. */
export function formatBytes(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / 1024 / 1024).toFixed(1)} MB`
  return `${Math.max(1, Math.round(bytes / 1024))} KB`
}
