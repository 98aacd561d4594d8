/**
 * Invented builds for the bench and the unit tests (never shown by the app): a seeded generator
 * of search documents with formulaic titles, a long tail of invented shop and part words, and
 * smooth parametric power curves on the index's rpm grid.
 */
import { seededRandom, type Random } from '../shared/random'
import { ASPIRATIONS, CURVE_STEP_RPM, FUELS, USES, type Aspiration, type Fuel, type SearchDocument, type Use } from './types'

const FAMILIES = [
  { label: 'Pushrod V8, small block', cylinders: 8, bore: [3.9, 4.165], stroke: [3.25, 4.0], redline: [6600, 8000] },
  { label: 'Pushrod V8, big block', cylinders: 8, bore: [4.25, 4.5], stroke: [3.76, 4.5], redline: [6200, 7400] },
  { label: 'Pushrod V8, tall deck', cylinders: 8, bore: [4.5, 4.625], stroke: [4.5, 4.9], redline: [6000, 7000] },
  { label: 'Four-valve DOHC V8', cylinders: 8, bore: [3.55, 3.78], stroke: [3.5, 4.0], redline: [7200, 8600] },
  { label: 'Inline six, OHC', cylinders: 6, bore: [3.3, 4.05], stroke: [3.4, 4.25], redline: [6800, 7800] },
  { label: 'Inline four, DOHC', cylinders: 4, bore: [3.3, 3.7], stroke: [3.3, 3.9], redline: [7400, 9000] },
  { label: 'Pushrod V6', cylinders: 6, bore: [3.8, 4.0], stroke: [3.4, 3.6], redline: [6000, 7000] },
  { label: 'Flat-plane DOHC V8', cylinders: 8, bore: [3.6, 3.8], stroke: [3.3, 3.7], redline: [8000, 9000] },
] as const

const SPECIFIC: Record<Aspiration, [number, number]> = { na: [1.0, 1.5], turbo: [1.8, 3.0], supercharged: [1.6, 2.6], nitrous: [1.5, 2.3] }
const ASPIRATION_WORDS: Record<Aspiration, string> = { na: 'naturally aspirated', turbo: 'twin-turbo', supercharged: 'supercharged', nitrous: 'nitrous-assisted' }
const FUEL_WORDS: Record<Fuel, string> = { pump_gas: 'pump gas', race_gas: 'race gas', e85: 'E85', methanol: 'methanol' }
const USE_WORDS: Record<Use, string> = { drag: 'drag', road_course: 'road course', street_strip: 'street/strip', off_road: 'off-road', marine: 'marine', street: 'street' }
const HEADS = ['aluminium 23° heads, CNC-ported', 'aluminium 18° heads, hand-finished runners', 'cast-iron heads, bowl-blended', 'rectangle-port heads, CNC-ported', 'oval-port heads, street porting', 'raised-runner heads', 'four-valve heads, oversize valves', 'crossflow head, ported', 'billet heads, spread port']
const INTAKES = ['single-plane intake, port-matched', 'dual-plane intake', 'individual runner intake', 'fabricated sheet-metal intake', 'boost-rated cast intake, tall plenum', 'roots-style blower manifold', 'centrifugal blower plenum', 'plate nitrous intake', 'direct-port nitrous intake']
const SYLLABLES = ['har', 'row', 'kes', 'trel', 'bay', 'cin', 'der', 'flat', 'iron', 'vale', 'quar', 'ry', 'tall', 'grass', 'bright', 'wa', 'ter', 'nine', 'fold', 'mar', 'ish', 'ald', 'ous', 'wren', 'oak', 'ston', 'fen', 'lum', 'brak', 'tor', 'vel', 'dun', 'mir', 'sal', 'ket', 'por', 'zan', 'gul', 'hev', 'lind']
const SHOP_KINDS = ['Engine Works', 'Machine', 'Performance', 'Speed', 'Racing Engines', 'Cylinder Co.', 'Dyno & Machine', 'Power']
const NOTES = ['endurance', 'oiling', 'cooling', 'balanced', 'blueprinted', 'sleeved', 'billet', 'forged', 'knife-edged', 'deburred', 'coated', 'lightweight', 'drysump', 'wetsump', 'stud-girdled', 'fire-ringed', 'o-ringed', 'gapless', 'polished', 'nitrided']

const round = (v: number, places: number) => Math.round(v * 10 ** places) / 10 ** places

function inventedWord(r: Random): string {
  const n = r.int(2, 3)
  let w = ''
  for (let i = 0; i < n; i++) w += r.pick(SYLLABLES)
  return w
}

/** Deterministic invented shops: name, slug and region. */
export function syntheticShops(count: number, seed = 7) {
  const r = seededRandom(seed)
  const regions = Array.from({ length: 40 }, () => `${cap(inventedWord(r))} ${r.pick(['Basin', 'Ridge', 'Shore', 'Valley', 'Mesa', 'Plains', 'Hollow', 'Coast'])}`)
  return Array.from({ length: count }, (_, i) => {
    const name = `${cap(inventedWord(r))} ${cap(inventedWord(r))} ${r.pick(SHOP_KINDS)}`
    return { id: i + 1, slug: `${name.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/-$/, '')}-${i + 1}`, name, region: r.pick(regions) }
  })
}

const cap = (s: string) => s.charAt(0).toUpperCase() + s.slice(1)

/** A smooth power curve on the grid: a skewed bell of torque scaled to a peak power, with a little noise. */
function curve(r: Random, peakHpTarget: number, redline: number, boosted: boolean) {
  const tqRpm = redline * r.between(boosted ? 0.55 : 0.66, boosted ? 0.66 : 0.76)
  const below = tqRpm * r.between(boosted ? 0.55 : 0.75, boosted ? 0.7 : 0.95)
  const above = (redline - tqRpm) * r.between(1.4, 1.9)
  const startRpm = Math.round(r.between(2500, 3600) / CURVE_STEP_RPM) * CURVE_STEP_RPM
  const endRpm = Math.round(redline / CURVE_STEP_RPM) * CURVE_STEP_RPM
  const tq: number[] = []
  for (let rpm = startRpm; rpm <= endRpm; rpm += CURVE_STEP_RPM) {
    const x = (rpm - tqRpm) / (rpm < tqRpm ? below : above)
    tq.push(Math.exp(-x * x) * (1 + r.between(-0.003, 0.003)))
  }
  const shapeHp = tq.map((t, k) => (t * (startRpm + k * CURVE_STEP_RPM)) / 5252)
  const scale = peakHpTarget / Math.max(...shapeHp)
  const hp = shapeHp.map(h => round(h * scale, 1))
  const lbFt = tq.map(t => round(t * scale, 1))
  let hi = 0
  let ti = 0
  for (let k = 1; k < hp.length; k++) {
    if ((hp[k] as number) > (hp[hi] as number)) hi = k
    if ((lbFt[k] as number) > (lbFt[ti] as number)) ti = k
  }
  return { startRpm, hp, peakHp: hp[hi] as number, peakHpRpm: startRpm + hi * CURVE_STEP_RPM, peakTq: lbFt[ti] as number, peakTqRpm: startRpm + ti * CURVE_STEP_RPM }
}

/** `count` invented builds from `shops` shops, the same for the same arguments. */
export function syntheticDocuments(count: number, opts: { seed?: number, shops?: number } = {}): SearchDocument[] {
  const r = seededRandom(opts.seed ?? 20261201)
  const shops = syntheticShops(opts.shops ?? Math.max(8, Math.round(count / 60)), (opts.seed ?? 20261201) + 1)
  const epoch = Date.UTC(2026, 0, 1)
  const out: SearchDocument[] = new Array(count)
  for (let i = 0; i < count; i++) {
    const shop = r.pick(shops)
    const family = r.pick(FAMILIES)
    const aspiration = r.pick(ASPIRATIONS)
    const fuel = aspiration === 'turbo' ? r.pick(['e85', 'race_gas', 'pump_gas'] as const) : r.pick(FUELS)
    const use = r.pick(USES)
    const bore = round(r.between(family.bore[0], family.bore[1]), 3)
    const stroke = round(r.between(family.stroke[0], family.stroke[1]), 3)
    const ci = (Math.PI / 4) * bore * bore * stroke * family.cylinders
    const redline = Math.round(r.between(family.redline[0], family.redline[1]) / 100) * 100
    const boosted = aspiration === 'turbo' || aspiration === 'supercharged'
    const c = r.next() < 0.02 ? null : curve(r, ci * r.between(SPECIFIC[aspiration][0], SPECIFIC[aspiration][1]), redline, boosted)
    const heads = r.pick(HEADS)
    const intake = r.pick(INTAKES)
    const duration = r.int(boosted ? 224 : 234, boosted ? 248 : 276)
    const code = shop.name.split(/\s+/).map(w => w[0]).join('').toUpperCase()
    const notes = [r.pick(NOTES), r.pick(NOTES), inventedWord(r)]
    out[i] = {
      id: i + 1,
      slug: `${Math.round(ci)}-${aspiration}-${fuel.replace('_', '-')}-${i + 1}`,
      title: cap(`${Math.round(ci)} ci ${ASPIRATION_WORDS[aspiration]} ${family.label.toLowerCase()} on ${FUEL_WORDS[fuel]}`),
      summary: `${round(ci * 0.016387064, 1)} litre ${family.label.toLowerCase()} for ${USE_WORDS[use]} use, ${notes.join(', ')}.`,
      parts: [
        `Rotating assembly: forged crankshaft, ${stroke.toFixed(3)} in stroke ${code}-CR-${r.int(1, 99)}`,
        `Rotating assembly: ${r.pick(['H-beam', 'I-beam', 'billet'])} rods ${code}-RD-${r.int(1, 99)}`,
        `Cylinder heads: ${heads} ${code}-HD-${r.int(1, 99)}`,
        `Camshaft: ${r.pick(['roller', 'flat-tappet', 'solid roller', 'hydraulic roller'])} camshaft ${code}-CM-${r.int(1, 99)}`,
        `Induction: ${intake} ${code}-IN-${r.int(1, 99)}`,
        `Oiling: ${r.pick(['wet-sump pan', 'dry-sump system', 'baffled pan'])} ${code}-OL-${r.int(1, 99)}`,
      ],
      heads,
      camshaft: `${duration}°/${duration + r.pick([4, 6, 8, 10])}° at 0.050 in, ${r.pick([106, 108, 110, 112, 114, 116])}° lobe separation`,
      intake,
      shop: { id: shop.id, slug: shop.slug, name: shop.name },
      family: family.label,
      displacementCi: ci,
      peakHp: c?.peakHp ?? null,
      peakHpRpm: c?.peakHpRpm ?? null,
      peakTq: c?.peakTq ?? null,
      peakTqRpm: c?.peakTqRpm ?? null,
      aspiration,
      fuel,
      use,
      region: shop.region,
      priceCents: Math.round(r.between(12, 90) * (boosted ? 1.4 : 1) * 1000) * 100,
      verified: r.next() < 0.7,
      publishedAt: epoch - r.int(0, 900) * 86_400_000 - r.int(0, 86_399) * 1000,
      stamp: `synthetic-${i + 1}`,
      curve: c ? { startRpm: c.startRpm, hp: c.hp } : null,
    }
  }
  return out
}
