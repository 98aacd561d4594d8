import { z } from 'zod'
import { CORRECTION_STANDARDS } from '../engine/types'

const standardIds = CORRECTION_STANDARDS.map(s => s.id) as [string, ...string[]]

/** `?standard=` on every curve route; SAE J1349 (2004) when absent. */
export const standardQuery = z.object({
  standard: z.enum(standardIds, { error: `standard must be one of ${standardIds.join(', ')}` }).default('SAE_J1349_2004'),
})

export const compareQuery = standardQuery.extend({
  builds: z.string({ error: 'builds lists one to four build slugs, comma-separated' })
    .transform(s => s.split(',').map(x => x.trim()).filter(Boolean))
    .pipe(z.array(z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, 'each build is a slug')).min(1, 'name at least one build').max(4, 'compare at most four builds')),
})
