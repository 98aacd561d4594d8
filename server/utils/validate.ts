import type { z } from 'zod'

/** Turns a zod schema into an h3 validator whose failure is a 400 naming each bad field in plain words. */
export function validator<S extends z.ZodType>(schema: S, status = 400) {
  return (data: unknown): z.infer<S> => {
    const result = schema.safeParse(data)
    if (result.success) return result.data
    const issues = result.error.issues.map(issue => ({ path: issue.path.join('.'), message: issue.message }))
    const message = issues.map(i => (i.path ? `${i.path}: ${i.message}` : i.message)).join('; ')
    throw createError({ status, message, data: { issues } })
  }
}
