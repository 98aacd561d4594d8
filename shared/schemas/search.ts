import { z } from 'zod'
import { ASPIRATIONS, FUELS, USES } from '../domain'
import { BAND_RPM, SEARCH_SORTS } from '../search/values'

/**
 * The search parameters of GET /api/search, shared by the route and the search page (which reads
 * the same names from its URL). Every rule here answers a person: a 400 says which one failed.
 */
export { BAND_RPM, SEARCH_SORTS } from '../search/values'
export const MAX_RESULT_WINDOW = 10_000

/** An absent or empty parameter is no filter. */
const blankToUndefined = (v: unknown) => (v === '' || v === null ? undefined : v)

function numberParam(name: string, min: number, max: number, unit: string, integer = false) {
  let n = z.coerce.number({ error: `${name} is a number` })
    .refine(Number.isFinite, `${name} is a number`)
    .refine(v => v >= min, `${name} is at least ${min}${unit}`)
    .refine(v => v <= max, `${name} is at most ${max}${unit}`)
  if (integer) n = n.refine(Number.isInteger, `${name} is a whole number`)
  return z.preprocess(v => (Array.isArray(v) ? Number.NaN : blankToUndefined(v)), n.optional())
}

function listParam<T extends z.ZodType>(name: string, item: T) {
  return z.preprocess(
    v => (v === undefined || v === '' ? undefined : (Array.isArray(v) ? v : [v]).filter(x => x !== '')),
    z.array(item).max(20, `${name} may repeat at most 20 times`).optional(),
  )
}

const enumItem = <const T extends readonly [string, ...string[]]>(name: string, values: T) =>
  z.enum(values, { error: () => `${name} is one of ${values.join(', ')}` })

const text = (name: string, max: number) => z.string().trim().min(1, `${name} is empty`).max(max, `${name} is at most ${max} characters`)

const unknownParameter = { error: (issue: z.core.$ZodRawIssue) => (issue.code === 'unrecognized_keys' ? `unknown parameter ${issue.keys.join(', ')}` : undefined) }

/** What a search asks for: everything but the order and the page. A saved search stores exactly these. */
const filterShape = {
  q: z.preprocess(blankToUndefined, z.string({ error: 'q is one piece of text' }).max(200, 'q is at most 200 characters').optional()),
  ciMin: numberParam('ciMin', 0, 2000, ' ci'),
  ciMax: numberParam('ciMax', 0, 2000, ' ci'),
  hpMin: numberParam('hpMin', 0, 20000, ' hp'),
  hpMax: numberParam('hpMax', 0, 20000, ' hp'),
  hpTarget: numberParam('hpTarget', 1, 20000, ' hp'),
  hpTolerance: numberParam('hpTolerance', 0, 5000, ' hp'),
  tqMin: numberParam('tqMin', 0, 20000, ' lb·ft'),
  tqMax: numberParam('tqMax', 0, 20000, ' lb·ft'),
  aspiration: listParam('aspiration', enumItem('aspiration', ASPIRATIONS)),
  fuel: listParam('fuel', enumItem('fuel', FUELS)),
  family: listParam('family', text('family', 60)),
  use: listParam('use', enumItem('use', USES)),
  region: listParam('region', text('region', 80)),
  // A stored (already validated) query carries a boolean; a URL carries the word.
  verified: z.preprocess(v => (typeof v === 'boolean' ? String(v) : blankToUndefined(v)), z.enum(['true', 'false'], { error: () => 'verified is true or false' }).optional())
    .transform(v => (v === undefined ? undefined : v === 'true')),
  priceMax: numberParam('priceMax', 0, 100_000_000, ' dollars', true),
  bandFrom: numberParam('bandFrom', BAND_RPM.min, BAND_RPM.max, ' rpm', true),
  bandTo: numberParam('bandTo', BAND_RPM.min, BAND_RPM.max, ' rpm', true),
}

type FilterValues = z.infer<z.ZodObject<typeof filterShape>>

/** The rules between filters (ranges the right way round, a tolerance with its target, a whole band). */
function checkFilters(v: FilterValues, ctx: z.RefinementCtx): void {
  const fail = (path: string, message: string) => ctx.addIssue({ code: 'custom', path: [path], message })
  if (v.ciMin !== undefined && v.ciMax !== undefined && v.ciMin > v.ciMax) fail('ciMin', 'ciMin is above ciMax')
  if (v.hpMin !== undefined && v.hpMax !== undefined && v.hpMin > v.hpMax) fail('hpMin', 'hpMin is above hpMax')
  if (v.tqMin !== undefined && v.tqMax !== undefined && v.tqMin > v.tqMax) fail('tqMin', 'tqMin is above tqMax')
  if (v.hpTolerance !== undefined && v.hpTarget === undefined) fail('hpTolerance', 'hpTolerance needs hpTarget (the power it is measured from)')
  if ((v.bandFrom === undefined) !== (v.bandTo === undefined)) fail(v.bandFrom === undefined ? 'bandFrom' : 'bandTo', 'a band needs both bandFrom and bandTo')
  if (v.bandFrom !== undefined && v.bandTo !== undefined && v.bandTo - v.bandFrom < 100) fail('bandTo', 'bandTo is at least 100 rpm above bandFrom')
}

/** The filters alone (GET /api/search less sort, page and perPage): what a saved search keeps. */
export const searchFilters = z.strictObject(filterShape, unknownParameter).superRefine(checkFilters)

/** Validated filters; every key may be absent. */
export type SearchFilterParams = Partial<z.output<typeof searchFilters>>

export const searchQuery = z.strictObject({
  ...filterShape,
  sort: z.preprocess(blankToUndefined, enumItem('sort', SEARCH_SORTS).optional()),
  page: z.preprocess(blankToUndefined, z.coerce.number({ error: 'page is a whole number' }).int('page is a whole number').min(1, 'page starts at 1').max(MAX_RESULT_WINDOW, `page is at most ${MAX_RESULT_WINDOW}`).default(1)),
  perPage: z.preprocess(blankToUndefined, z.coerce.number({ error: 'perPage is a whole number' }).int('perPage is a whole number').min(1, 'perPage is at least 1').max(100, 'perPage is at most 100').default(24)),
}, unknownParameter).superRefine((v, ctx) => {
  checkFilters(v, ctx)
  const fail = (path: string, message: string) => ctx.addIssue({ code: 'custom', path: [path], message })
  if (v.sort === 'target' && v.hpTarget === undefined) fail('sort', 'sort=target needs hpTarget')
  if (v.sort === 'band' && (v.bandFrom === undefined || v.bandTo === undefined)) fail('sort', 'sort=band needs bandFrom and bandTo')
  if (v.page * v.perPage > MAX_RESULT_WINDOW) fail('page', `page × perPage is at most ${MAX_RESULT_WINDOW}: narrow the search instead`)
})

export type SearchQueryInput = z.infer<typeof searchQuery>

/** GET /api/builders/for-target: the target a racer wants shops to have proven. */
export const forTargetQuery = z.strictObject({
  ci: numberParam('ci', 1, 2000, ' ci'),
  ciMin: numberParam('ciMin', 0, 2000, ' ci'),
  ciMax: numberParam('ciMax', 0, 2000, ' ci'),
  hp: numberParam('hp', 1, 20000, ' hp'),
  aspiration: z.preprocess(blankToUndefined, enumItem('aspiration', ASPIRATIONS).optional()),
  fuel: z.preprocess(blankToUndefined, enumItem('fuel', FUELS).optional()),
  limit: z.preprocess(blankToUndefined, z.coerce.number({ error: 'limit is a whole number' }).int('limit is a whole number').min(1, 'limit is at least 1').max(50, 'limit is at most 50').default(5)),
  // The track record (README, "Reviews and track record"): order by it, or keep shops that reach a share on time or a count of completed orders.
  sort: z.preprocess(blankToUndefined, enumItem('sort', ['score', 'record', 'proof'] as const).default('score')),
  minOnTimePct: numberParam('minOnTimePct', 0, 100, ' %'),
  minCompleted: numberParam('minCompleted', 0, 100000, ' orders', true),
}, unknownParameter).superRefine((v, ctx) => {
  if (v.ci === undefined && (v.ciMin === undefined || v.ciMax === undefined)) ctx.addIssue({ code: 'custom', path: ['ci'], message: 'ci (the displacement) is required, or both ciMin and ciMax' })
  if (v.ciMin !== undefined && v.ciMax !== undefined && v.ciMin > v.ciMax) ctx.addIssue({ code: 'custom', path: ['ciMin'], message: 'ciMin is above ciMax' })
  if (v.hp === undefined) ctx.addIssue({ code: 'custom', path: ['hp'], message: 'hp (the power target) is required' })
})

export type ForTargetQuery = z.infer<typeof forTargetQuery>
