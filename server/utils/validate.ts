import type { z } from 'zod'
import { ILL_FORMED_TEXT, illFormedTextPath } from '#shared/schemas/common'

/**
 * Turns a zod schema into an h3 validator whose failure is a 400 naming each bad field in plain words.
 * Every string of the input (body, query or route parameters) must be well-formed Unicode first: a lone
 * surrogate would otherwise reach MariaDB, the search index or a URL and fail there.
 */
export function validator<S extends z.ZodType>(schema: S, status = 400) {
  return (data: unknown): z.infer<S> => {
    const broken = illFormedTextPath(data)
    if (broken !== null) {
      const issues = [{ path: broken, message: `The text ${ILL_FORMED_TEXT}` }]
      const message = broken ? `${broken}: The text ${ILL_FORMED_TEXT}` : `The text ${ILL_FORMED_TEXT}`
      throw createError({ status: 400, message, data: { issues } })
    }
    const result = schema.safeParse(data)
    if (result.success) return result.data
    const issues = result.error.issues.map(issue => ({ path: issue.path.join('.'), message: issue.message }))
    const message = issues.map(i => (i.path ? `${i.path}: ${i.message}` : i.message)).join('; ')
    throw createError({ status, message, data: { issues } })
  }
}
