/** A `next` query value that is safe to send the browser to: a path on this site, never another host. */
export function safeNextPath(value: unknown): string | null {
  if (typeof value !== 'string' || !value.startsWith('/') || value.startsWith('//') || value.includes('\\')) return null
  return value
}
