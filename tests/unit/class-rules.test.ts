import { describe, expect, it } from 'vitest'
import { classBand, classBreaks } from '../../shared/class/rules'
import { classRulesSchema } from '../../shared/schemas/class-rules'

const rules = (over: Record<string, unknown> = {}) => classRulesSchema.parse(over)
const build = { displacementCi: 409.6, aspiration: 'na', fuel: 'pump_gas', peakHp: 600 }

describe('class rules: the checker', () => {
  it('passes a build inside every rule, and one whose figures are unknown', () => {
    const r = rules({ displacementCapCi: 410, aspirations: ['na'], fuels: ['pump_gas', 'race_gas'], raceWeightLb: 3000, minLbPerHp: 5 })
    expect(classBreaks(r, build)).toEqual([])
    expect(classBreaks(r, { displacementCi: null, aspiration: null, fuel: null, peakHp: null })).toEqual([])
  })

  it('names the displacement cap a build is over, rounding as the build shows it', () => {
    expect(classBreaks(rules({ displacementCapCi: 410 }), { ...build, displacementCi: 410.4 })).toEqual([])
    expect(classBreaks(rules({ displacementCapCi: 410 }), { ...build, displacementCi: 427.2 }))
      .toEqual([{ rule: 'displacement', message: 'over the 410 ci cap (427 ci)' }])
  })

  it('names a fuel and an aspiration the class does not allow; an empty list allows any', () => {
    const r = rules({ aspirations: ['na', 'nitrous'], fuels: ['pump_gas'] })
    expect(classBreaks(r, { ...build, fuel: 'e85', aspiration: 'turbo' }).map(b => b.message))
      .toEqual(['aspiration: turbocharged not allowed', 'fuel: E85 not allowed'])
    expect(classBreaks(rules(), { ...build, fuel: 'methanol', aspiration: 'supercharged' })).toEqual([])
  })

  it('checks weight-to-power as race weight ÷ peak power against the minimum', () => {
    const r = rules({ raceWeightLb: 3000, minLbPerHp: 5 })
    expect(classBreaks(r, { ...build, peakHp: 600 })).toEqual([]) // exactly 5.00 lb/hp
    expect(classBreaks(r, { ...build, peakHp: 750 })).toEqual([{ rule: 'weight_to_power', message: 'weight-to-power: 4.00 lb/hp at 3,000 lb is under the 5 lb/hp minimum' }])
  })

  it('gives the band from converter stall (or launch) to shift, and none when incomplete', () => {
    expect(classBand(rules({ transmission: 'automatic', stallRpm: 4200, shiftRpm: 6800 }))).toEqual({ from: 4200, to: 6800 })
    expect(classBand(rules({ transmission: 'manual', launchRpm: 5000, shiftRpm: 7500 }))).toEqual({ from: 5000, to: 7500 })
    expect(classBand(rules({ transmission: 'manual', shiftRpm: 7500 }))).toBeNull()
  })
})

describe('class rules: the schema', () => {
  it('refuses a stall speed without an automatic, half a weight-to-power rule, a band the wrong way and repeats', () => {
    const problems = (v: unknown) => classRulesSchema.safeParse(v).error?.issues.map(i => i.message) ?? []
    expect(problems({ transmission: 'manual', stallRpm: 4000 })).toContain('A stall speed applies to an automatic only')
    expect(problems({ raceWeightLb: 3000 })).toContain('A weight-to-power rule needs both the race weight and the minimum lb/hp')
    expect(problems({ transmission: 'automatic', stallRpm: 5000, shiftRpm: 5050 })).toContain('The shift rpm is at least 100 rpm above the launch or stall speed')
    expect(problems({ fuels: ['e85', 'e85'] })).toContain('Each fuel at most once')
    expect(problems({ displacementCapCi: 5 })).toContain('The displacement cap is at least 30 ci')
    expect(problems({ colour: 'red' })).toEqual(['unknown field colour'])
  })
})
