import type { z } from 'zod'
import { fieldErrors } from '#shared/schemas/auth'

type Issue = { path: string, message: string }

/** validator()'s per-field issues, wherever h3 nested them in the answer. */
function issuesIn(body: unknown): Issue[] {
  let node = body as { issues?: Issue[], data?: unknown } | undefined
  for (let depth = 0; node && depth < 4; depth++) {
    if (Array.isArray(node.issues)) return node.issues
    node = node.data as typeof node
  }
  return []
}

/** The server's 4xx answer: a message, and per-field issues when validator() or fieldError() made it. */
function serverErrors(err: unknown): Record<string, string> {
  const data = (err as { data?: { message?: string } }).data
  const out: Record<string, string> = {}
  for (const issue of issuesIn(data)) {
    const key = issue.path.split('.')[0] || '_form'
    out[key] ??= issue.message
  }
  if (!Object.keys(out).length) out._form = data?.message ?? 'Something went wrong: try again.'
  return out
}

/**
 * A form validated with the same zod schema as its route: errors per field (and `_form` for the
 * whole form), a pending flag, and the server's answers mapped the same way.
 */
export function useFormState<S extends z.ZodType>(schema: S) {
  const errors = ref<Record<string, string>>({})
  const pending = ref(false)

  /** Validates, then sends; `send` may answer a message for the whole form instead of throwing. */
  async function submit(values: unknown, send: (data: z.infer<S>) => Promise<unknown>): Promise<boolean> {
    errors.value = {}
    const parsed = schema.safeParse(values)
    if (!parsed.success) {
      errors.value = fieldErrors(parsed.error)
      return false
    }
    pending.value = true
    try {
      const refusal = await send(parsed.data)
      if (typeof refusal === 'string') {
        errors.value = { _form: refusal }
        return false
      }
      return true
    }
    catch (err) {
      errors.value = serverErrors(err)
      return false
    }
    finally {
      pending.value = false
    }
  }

  return { errors, pending, submit }
}
