import { z } from 'zod'
import { TRANSMISSIONS } from '../deals/constants'
import { ASPIRATIONS, FUELS } from '../domain'

/** The driveline's rpm fields, shared by the class rules and the quote request (the same ranges and words in both). */
export const drivelineRpmFields = {
  launchRpm: z.number({ error: 'The launch rpm is a number' }).int('The launch rpm is a whole number').min(1000, 'The launch rpm is at least 1,000').max(9000, 'The launch rpm is at most 9,000').nullable().default(null),
  stallRpm: z.number({ error: 'The stall speed is a number' }).int('The stall speed is a whole number of rpm').min(1000, 'The stall speed is at least 1,000 rpm').max(9000, 'The stall speed is at most 9,000 rpm').nullable().default(null),
  shiftRpm: z.number({ error: 'The shift rpm is a number' }).int('The shift rpm is a whole number').min(2000, 'The shift rpm is at least 2,000').max(12000, 'The shift rpm is at most 12,000').nullable().default(null),
}

/**
 * A racer's class rules (PUT /api/me/class, the form on /account): the displacement cap, the allowed
 * aspiration and fuel (empty: any), an optional minimum weight-to-power, and the car's driveline
 * (transmission, launch or converter stall, shift), which gives the rpm band search and quotes start from.
 * The ranges and the stall rule are those of the quote request, so a request can start from them as they are.
 */
export const classRulesSchema = z.strictObject({
  className: z.string({ error: 'The class name is text' }).trim().max(80, 'The class name is at most 80 characters').default(''),
  displacementCapCi: z.number({ error: 'The displacement cap is a number' }).min(30, 'The displacement cap is at least 30 ci').max(1000, 'The displacement cap is at most 1,000 ci').nullable().default(null),
  aspirations: z.array(z.enum(ASPIRATIONS, { error: `Each aspiration is one of ${ASPIRATIONS.join(', ')}` })).max(ASPIRATIONS.length, 'Each aspiration at most once').default([]),
  fuels: z.array(z.enum(FUELS, { error: `Each fuel is one of ${FUELS.join(', ')}` })).max(FUELS.length, 'Each fuel at most once').default([]),
  raceWeightLb: z.number({ error: 'The race weight is a number' }).min(300, 'The race weight is at least 300 lb').max(10000, 'The race weight is at most 10,000 lb').nullable().default(null),
  minLbPerHp: z.number({ error: 'The minimum weight-to-power is a number' }).min(0.5, 'The minimum weight-to-power is at least 0.5 lb/hp').max(50, 'The minimum weight-to-power is at most 50 lb/hp').nullable().default(null),
  transmission: z.enum(TRANSMISSIONS, { error: 'Pick a transmission' }).nullable().default(null),
  ...drivelineRpmFields,
}, { error: issue => (issue.code === 'unrecognized_keys' ? `unknown field ${issue.keys.join(', ')}` : undefined) }).superRefine((v, ctx) => {
  const fail = (path: string, message: string) => ctx.addIssue({ code: 'custom', path: [path], message })
  if (new Set(v.aspirations).size !== v.aspirations.length) fail('aspirations', 'Each aspiration at most once')
  if (new Set(v.fuels).size !== v.fuels.length) fail('fuels', 'Each fuel at most once')
  if ((v.raceWeightLb === null) !== (v.minLbPerHp === null)) fail(v.raceWeightLb === null ? 'raceWeightLb' : 'minLbPerHp', 'A weight-to-power rule needs both the race weight and the minimum lb/hp')
  if (v.transmission !== 'automatic' && v.stallRpm !== null) fail('stallRpm', 'A stall speed applies to an automatic only')
  if (v.transmission === 'automatic' && v.launchRpm !== null) fail('launchRpm', 'With an automatic, the converter stall speed is the launch')
  const from = v.stallRpm ?? v.launchRpm
  if (from !== null && v.shiftRpm !== null && v.shiftRpm - from < 100) fail('shiftRpm', 'The shift rpm is at least 100 rpm above the launch or stall speed')
})

export type ClassRules = z.output<typeof classRulesSchema>
export type ClassRulesInput = z.input<typeof classRulesSchema>
