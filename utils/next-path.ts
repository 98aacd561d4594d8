import { isSafeNextPath } from '#shared/schemas/auth'

/** A `next` query value that is safe to send the browser to: a path on this site, never another host. */
export function safeNextPath(value: unknown): string | null {
  return isSafeNextPath(value) ? value : null
}
