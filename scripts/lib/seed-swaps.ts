// Invented before/after comparisons for the swap results page: the same short block pulled before
// and after one change, made by the demo's parametric curve model. Kept apart from the main scenario
// so the two can grow independently; every comparison here is verified, so it counts.
import { makeCurve, type DemoBuild, type DemoPull } from './demo-data'
import { seededRandom } from '../../shared/random'

type SwapKind = 'heads' | 'camshaft' | 'intake'

/**
 * How each change reshapes the curve (an invented model of common practice): a fractional torque change
 * that runs smoothly from `low` at the bottom of the pull to `top` at the top, crossing over near `pivot`
 * (a fraction of the pull's rpm range). Each comparison draws its own values from these ranges.
 */
const EFFECTS: Record<SwapKind, { low: [number, number], top: [number, number], pivot: [number, number], notes: string[], baseline: string }> = {
  heads: {
    low: [-0.02, 0.012], top: [0.03, 0.08], pivot: [0.4, 0.6], baseline: 'Before: the previous heads',
    notes: ['CNC-ported heads in place of as-cast heads', 'Larger-runner heads with bigger valves', 'Hand-ported heads, reshaped short-side radius'],
  },
  camshaft: {
    low: [-0.065, -0.015], top: [0.035, 0.09], pivot: [0.5, 0.68], baseline: 'Before: the milder camshaft',
    notes: ['Longer-duration camshaft, wider lobe separation', 'More lift and 8° more duration', 'Tighter lobe separation, later intake closing'],
  },
  intake: {
    low: [-0.045, 0.005], top: [0.015, 0.06], pivot: [0.48, 0.66], baseline: 'Before: the dual-plane intake',
    notes: ['Single-plane intake in place of the dual-plane', 'Tall single-plane with a spacer', 'Fabricated intake with shorter runners'],
  },
}

const KINDS: SwapKind[] = ['heads', 'camshaft', 'intake']
const round = (value: number, places: number) => Math.round(value * 10 ** places) / 10 ** places

/** The before pull of a short block: the after curve with this comparison's change taken out, plus a little noise of its own. */
function before(r: ReturnType<typeof seededRandom>, after: DemoPull['points'], e: { low: number, top: number, pivot: number }): DemoPull['points'] {
  const first = after[0]!.rpm
  const last = after[after.length - 1]!.rpm
  const pivot = first + (last - first) * e.pivot
  const width = (last - first) * 0.12
  return after.map((p) => {
    const s = 1 / (1 + Math.exp(-(p.rpm - pivot) / width))
    const gain = e.low + (e.top - e.low) * s
    const lbFt = round((p.lbFt / (1 + gain)) * (1 + r.between(-0.002, 0.002)), 1)
    return { rpm: p.rpm, lbFt, hp: round((lbFt * p.rpm) / 5252, 1) }
  })
}

/** The invented comparisons, each a build of its own on the combination of one of `templates`; the same on every run. */
export function demoSwapBuilds(templates: readonly DemoBuild[], count = 36): DemoBuild[] {
  const r = seededRandom(20261205)
  const usable = templates.filter(t => t.pulls.every(p => p.status === 'verified' && !p.copiedFrom))
  const out: DemoBuild[] = []
  for (let k = 0; k < count && k < usable.length; k++) {
    const template = usable[k]!
    const kind = KINDS[k % KINDS.length]!
    const effect = EFFECTS[kind]
    const shape = { low: r.between(...effect.low), top: r.between(...effect.top), pivot: r.between(...effect.pivot) }
    const final = template.pulls[0]!
    const redline = final.points[final.points.length - 1]!.rpm
    const stepRpm = final.points[1]!.rpm - final.points[0]!.rpm
    const peakHpTarget = Math.max(...final.points.map(p => p.hp)) * r.between(0.95, 1.05)
    const boosted = template.aspiration === 'turbo' || template.aspiration === 'supercharged'
    const afterPoints = makeCurve(r, { peakHpTarget, redline, boosted, stepRpm })
    const note = r.pick(effect.notes)
    const weather = () => ({ baroInHg: round(r.between(28.6, 30.2), 2), airTempF: round(r.between(55, 95), 1), humidityPct: round(r.between(20, 75), 0) })
    const common = { dynoKind: 'engine' as const, declaredStandard: final.declaredStandard, status: 'verified' as const }
    out.push({
      ...template,
      slug: `${template.slug}-${kind}-ab`,
      title: `${template.title}, ${kind === 'camshaft' ? 'cam' : kind} swap tested`,
      summary: `${template.summary} Pulled on the same short block before and after one change: ${note.charAt(0).toLowerCase()}${note.slice(1)}.`,
      publishedDaysAgo: r.int(2, 400),
      parts: template.parts.map(p => ({ ...p })),
      pulls: [
        { ...common, label: `After: ${note.charAt(0).toLowerCase()}${note.slice(1)}`, weather: weather(), points: afterPoints, comparisonRole: 'variant', changeKind: kind, changeNote: note },
        { ...common, label: effect.baseline, weather: weather(), points: before(r, afterPoints, shape), comparisonRole: 'baseline' },
      ],
    })
  }
  return out
}
