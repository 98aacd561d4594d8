/** Which of a racer's class rules a build breaks, in words a racer reads at a glance. Pure. */
import type { ClassRules } from '../schemas/class-rules'

const FUEL_WORDS: Record<string, string> = { pump_gas: 'pump gas', race_gas: 'race gas', e85: 'E85', methanol: 'methanol' }
const ASPIRATION_WORDS: Record<string, string> = { na: 'naturally aspirated', turbo: 'turbocharged', supercharged: 'supercharged', nitrous: 'nitrous' }

/** What the checker needs of a build: its displacement, aspiration, fuel and (verified or claimed) peak power. */
export interface ClassCheckedBuild {
  displacementCi: number | null
  aspiration: string | null
  fuel: string | null
  peakHp: number | null
}

export type ClassRuleId = 'displacement' | 'aspiration' | 'fuel' | 'weight_to_power'

export interface ClassBreak { rule: ClassRuleId, message: string }

const whole = (n: number) => Math.round(n).toLocaleString('en-US')

/**
 * The rules a build breaks, in a fixed order; an empty list when it fits (or a figure is unknown:
 * a rule is only called broken on a figure the build has). Weight-to-power is race weight ÷ peak power.
 */
export function classBreaks(rules: ClassRules, build: ClassCheckedBuild): ClassBreak[] {
  const out: ClassBreak[] = []
  if (rules.displacementCapCi !== null && build.displacementCi !== null && Math.round(build.displacementCi) > rules.displacementCapCi) {
    out.push({ rule: 'displacement', message: `over the ${whole(rules.displacementCapCi)} ci cap (${whole(build.displacementCi)} ci)` })
  }
  if (rules.aspirations.length && build.aspiration !== null && !rules.aspirations.includes(build.aspiration as ClassRules['aspirations'][number])) {
    out.push({ rule: 'aspiration', message: `aspiration: ${ASPIRATION_WORDS[build.aspiration] ?? build.aspiration} not allowed` })
  }
  if (rules.fuels.length && build.fuel !== null && !rules.fuels.includes(build.fuel as ClassRules['fuels'][number])) {
    out.push({ rule: 'fuel', message: `fuel: ${FUEL_WORDS[build.fuel] ?? build.fuel} not allowed` })
  }
  if (rules.raceWeightLb !== null && rules.minLbPerHp !== null && build.peakHp !== null && build.peakHp > 0) {
    const ratio = rules.raceWeightLb / build.peakHp
    if (ratio < rules.minLbPerHp) {
      out.push({ rule: 'weight_to_power', message: `weight-to-power: ${ratio.toFixed(2)} lb/hp at ${whole(rules.raceWeightLb)} lb is under the ${rules.minLbPerHp} lb/hp minimum` })
    }
  }
  return out
}

/** The rpm band the rules give (converter stall or launch up to shift), or null when incomplete. */
export function classBand(rules: ClassRules): { from: number, to: number } | null {
  const from = rules.stallRpm ?? rules.launchRpm
  return from !== null && rules.shiftRpm !== null && rules.shiftRpm - from >= 100 ? { from, to: rules.shiftRpm } : null
}
