/**
 * One reading of a failed API call on the client, whatever threw it: an ofetch FetchError (from
 * $fetch or useFetch) carrying the route's `createError({ status, message })` answer, a network
 * failure with no answer at all, or a plain Error thrown by the page's own code.
 */
export interface ApiError {
  /** The HTTP status, when a server answered. */
  status?: number
  /** Words for a person: the route's own message, or a plain Error's; absent for a bare network failure. */
  message?: string
  /** Per-field messages (first one per top-level field) when validator() or fieldError() made the answer. */
  fields: Record<string, string>
}

type Issue = { path: string, message: string }
type Loose = {
  name?: string
  status?: number
  statusCode?: number
  message?: string
  data?: unknown
  response?: { status?: number }
  request?: unknown
}

/** validator()'s per-field issues, wherever h3 nested them in the answer. */
function issuesIn(body: unknown): Issue[] {
  let node = body as { issues?: Issue[], data?: unknown } | undefined
  for (let depth = 0; node && typeof node === 'object' && depth < 4; depth++) {
    if (Array.isArray(node.issues)) return node.issues
    node = node.data as typeof node
  }
  return []
}

/**
 * A FetchError's own message is a technical line ("[POST] "/api/…": 400 …"), never shown to a person;
 * useFetch copies that line into the NuxtError it hands back, so the line itself is recognised too.
 */
function isFetchError(e: Loose): boolean {
  return e.name === 'FetchError' || 'request' in e || 'response' in e || /^\[[A-Z]+\] "/.test(e.message ?? '')
}

export function apiError(err: unknown): ApiError {
  if (!err || typeof err !== 'object') return { fields: {} }
  const e = err as Loose
  const body = e.data as { message?: unknown } | undefined
  const status = e.status ?? e.statusCode ?? e.response?.status
  const fields: Record<string, string> = {}
  for (const issue of issuesIn(body)) {
    const key = issue.path.split('.')[0] || '_form'
    fields[key] ??= issue.message
  }
  let message = typeof body?.message === 'string' && body.message ? body.message : undefined
  if (!message && !isFetchError(e) && e.message) message = e.message
  return { status: typeof status === 'number' ? status : undefined, message, fields }
}

/** The words to show for a failed call: the route's (or a plain Error's) message, else the fallback. */
export function apiErrorMessage(err: unknown, fallback = 'Something went wrong: try again.'): string {
  return apiError(err).message ?? fallback
}
