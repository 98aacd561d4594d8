import { z } from 'zod'

/** Parameter shapes shared by every route: slugs, numeric ids and pagination. */
export const slugSchema = z.string().trim().min(1, 'A slug is required').max(160).regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, 'A slug has lower-case letters, digits and single hyphens')

export const slugParams = z.object({ slug: slugSchema })

export const idSchema = z.coerce.number({ error: 'An id is a whole number' }).int('An id is a whole number').positive('An id is positive').max(Number.MAX_SAFE_INTEGER)

export const idParams = z.object({ id: idSchema })

export const paginationQuery = z.object({
  page: z.coerce.number().int('page is a whole number').min(1, 'page starts at 1').max(10_000).default(1),
  perPage: z.coerce.number().int('perPage is a whole number').min(1, 'perPage is at least 1').max(100, 'perPage is at most 100').default(24),
})

export type Pagination = z.infer<typeof paginationQuery>

/**
 * The path of the first string (or object key) in a parsed request value that is not well-formed
 * Unicode, i.e. holds a lone UTF-16 surrogate; null when every string is sound. Iterative, and each
 * step keeps only a link to its parent, so a deeply nested body costs neither stack nor copies.
 */
export function illFormedTextPath(value: unknown): string | null {
  interface Step { value: unknown, key: string | null, parent: Step | null }
  const pathOf = (step: Step | null, last?: string): string => {
    const keys: string[] = last === undefined ? [] : [last]
    for (let s = step; s && s.key !== null; s = s.parent) keys.push(s.key)
    return keys.reverse().join('.')
  }
  const stack: Step[] = [{ value, key: null, parent: null }]
  while (stack.length) {
    const step = stack.pop()!
    const v = step.value
    if (typeof v === 'string') {
      if (!v.isWellFormed()) return pathOf(step)
    }
    else if (Array.isArray(v)) {
      for (let i = v.length - 1; i >= 0; i--) stack.push({ value: v[i], key: String(i), parent: step })
    }
    else if (v !== null && typeof v === 'object') {
      for (const [key, inner] of Object.entries(v).reverse()) {
        if (!key.isWellFormed()) return pathOf(step, key.toWellFormed())
        stack.push({ value: inner, key, parent: step })
      }
    }
  }
  return null
}

/** What a person reads when a field holds broken text. */
export const ILL_FORMED_TEXT = 'holds a broken character (a lone UTF-16 surrogate); retype the text or send it as UTF-8'
