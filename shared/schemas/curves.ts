import { z } from 'zod'
import { CORRECTION_STANDARD_IDS } from '../domain'

/** `?standard=` on every curve route; SAE J1349 (2004) when absent. */
export const standardQuery = z.object({
  standard: z.enum(CORRECTION_STANDARD_IDS, { error: `standard must be one of ${CORRECTION_STANDARD_IDS.join(', ')}` }).default('SAE_J1349_2004'),
})

const bandRpm = (name: string) => z.coerce.number({ error: `${name} is an rpm` })
  .refine(Number.isFinite, `${name} is an rpm`)
  .refine(n => n >= 1000 && n <= 12000, `${name} is between 1,000 and 12,000 rpm`)
  .optional()

export const compareQuery = standardQuery.extend({
  builds: z.string({ error: 'builds lists one to four build slugs, comma-separated' })
    .transform(s => s.split(',').map(x => x.trim()).filter(Boolean))
    .pipe(z.array(z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, 'each build is a slug')).min(1, 'name at least one build').max(4, 'compare at most four builds')),
  // The racer's band (launch or stall to shift rpm): each build's average power across it.
  bandFrom: bandRpm('bandFrom'),
  bandTo: bandRpm('bandTo'),
}).superRefine((v, ctx) => {
  if ((v.bandFrom === undefined) !== (v.bandTo === undefined)) ctx.addIssue({ code: 'custom', path: ['bandTo'], message: 'a band needs both bandFrom and bandTo' })
  if (v.bandFrom !== undefined && v.bandTo !== undefined && v.bandTo - v.bandFrom < 100) ctx.addIssue({ code: 'custom', path: ['bandTo'], message: 'bandTo is at least 100 rpm above bandFrom' })
})
