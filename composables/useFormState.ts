import type { z } from 'zod'
import { fieldErrors } from '#shared/schemas/auth'

/** The server's 4xx answer: per-field issues when validator() or fieldError() made it, else its message. */
function serverErrors(err: unknown): Record<string, string> {
  const { message, fields } = apiError(err)
  if (Object.keys(fields).length) return fields
  return { _form: message ?? 'Something went wrong: try again.' }
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
