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
