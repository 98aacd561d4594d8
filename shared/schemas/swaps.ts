import { z } from 'zod'
import { ASPIRATIONS, FUELS } from '../domain'
import { BAND_RPM } from './search'

/** The kinds of change a before/after comparison records (the dyno_pulls.change_kind values). */
export const SWAP_CHANGES = ['heads', 'intake', 'camshaft', 'exhaust', 'tune', 'other'] as const
export type SwapChange = (typeof SWAP_CHANGES)[number]

export const SWAP_CHANGE_LABELS: Record<SwapChange, string> = {
  heads: 'Cylinder heads', intake: 'Intake manifold', camshaft: 'Camshaft', exhaust: 'Exhaust', tune: 'Tune', other: 'Other change',
}

const blank = (v: unknown) => (v === '' || v === null ? undefined : v)
const one = (v: unknown) => (Array.isArray(v) ? Number.NaN : blank(v))

function number(name: string, min: number, max: number, unit: string) {
  return z.preprocess(one, z.coerce.number({ error: `${name} is a number` })
    .refine(Number.isFinite, `${name} is a number`)
    .refine(v => v >= min, `${name} is at least ${min}${unit}`)
    .refine(v => v <= max, `${name} is at most ${max}${unit}`)
    .optional())
}

const choice = <const T extends readonly [string, ...string[]]>(name: string, values: T) =>
  z.preprocess(v => (Array.isArray(v) ? '' : blank(v)), z.enum(values, { error: () => `${name} is one of ${values.join(', ')}` }).optional())

/** GET /api/swaps: one kind of change, within a displacement range, aspiration, fuel and the racer's band. */
export const swapsQuery = z.strictObject({
  change: z.preprocess(v => (Array.isArray(v) ? '' : v), z.enum(SWAP_CHANGES, { error: () => `change is required: one of ${SWAP_CHANGES.join(', ')}` })),
  ciMin: number('ciMin', 0, 2000, ' ci'),
  ciMax: number('ciMax', 0, 2000, ' ci'),
  aspiration: choice('aspiration', ASPIRATIONS),
  fuel: choice('fuel', FUELS),
  bandFrom: number('bandFrom', BAND_RPM.min, BAND_RPM.max, ' rpm'),
  bandTo: number('bandTo', BAND_RPM.min, BAND_RPM.max, ' rpm'),
}, { error: issue => (issue.code === 'unrecognized_keys' ? `unknown parameter ${issue.keys.join(', ')}` : undefined) }).superRefine((v, ctx) => {
  const fail = (path: string, message: string) => ctx.addIssue({ code: 'custom', path: [path], message })
  if (v.ciMin !== undefined && v.ciMax !== undefined && v.ciMin > v.ciMax) fail('ciMin', 'ciMin is above ciMax')
  if ((v.bandFrom === undefined) !== (v.bandTo === undefined)) fail(v.bandFrom === undefined ? 'bandFrom' : 'bandTo', 'a band needs both bandFrom and bandTo')
  if (v.bandFrom !== undefined && v.bandTo !== undefined && v.bandTo - v.bandFrom < 100) fail('bandTo', 'bandTo is at least 100 rpm above bandFrom')
})

export type SwapsQuery = z.output<typeof swapsQuery>
