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
 * Unicode, i.e. holds a lone UTF-16 surrogate; null when every string is sound. Iterative, so a
 * deeply nested body cannot exhaust the stack.
 */
export function illFormedTextPath(value: unknown): string | null {
  const stack: { value: unknown, path: string[] }[] = [{ value, path: [] }]
  while (stack.length) {
    const { value: v, path } = stack.pop()!
    if (typeof v === 'string') {
      if (!v.isWellFormed()) return path.join('.')
    }
    else if (Array.isArray(v)) {
      for (let i = v.length - 1; i >= 0; i--) stack.push({ value: v[i], path: [...path, String(i)] })
    }
    else if (v !== null && typeof v === 'object') {
      for (const [key, inner] of Object.entries(v).reverse()) {
        if (!key.isWellFormed()) return [...path, key.toWellFormed()].join('.')
        stack.push({ value: inner, path: [...path, key] })
      }
    }
  }
  return null
}

/** What a person reads when a field holds broken text. */
export const ILL_FORMED_TEXT = 'holds a broken character (a lone UTF-16 surrogate); retype the text or send it as UTF-8'
