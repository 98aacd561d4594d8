// The invented demo scenario: shops, people, builds and dyno curves that exist nowhere else.
// Every curve comes from a smooth parametric torque model with a little noise.
import type { Aspiration, Fuel, Use } from '../../shared/domain'
import { seededRandom, type Random } from '../../shared/random'
import type { PublishableBuild } from '../../shared/schemas/build'

export const DEMO_PASSWORD = 'torque-demo-2026'

export interface DemoShop {
  owner: { name: string, email: string }
  shopName: string
  slug: string
  region: string
  bio: string
  specialties: string[]
  capabilities: string[]
  families: FamilyKey[]
  aspirations: Aspiration[]
}

type FamilyKey = 'small_block' | 'big_block' | 'dohc_v8' | 'inline_six' | 'tall_deck'

interface Family {
  label: string
  cylinders: number
  bore: [number, number]
  stroke: [number, number]
  rod: [number, number]
  chamber: [number, number]
  redline: [number, number]
}

const FAMILIES: Record<FamilyKey, Family> = {
  small_block: { label: 'Pushrod V8, small block', cylinders: 8, bore: [4.000, 4.165], stroke: [3.480, 4.000], rod: [5.700, 6.200], chamber: [58, 72], redline: [6800, 7800] },
  big_block: { label: 'Pushrod V8, big block', cylinders: 8, bore: [4.250, 4.500], stroke: [4.000, 4.500], rod: [6.385, 6.800], chamber: [110, 124], redline: [6400, 7400] },
  tall_deck: { label: 'Pushrod V8, tall deck', cylinders: 8, bore: [4.500, 4.600], stroke: [4.500, 4.750], rod: [6.800, 7.100], chamber: [118, 130], redline: [6200, 7000] },
  dohc_v8: { label: 'Four-valve DOHC V8', cylinders: 8, bore: [3.630, 3.780], stroke: [3.650, 4.000], rod: [5.930, 6.125], chamber: [48, 60], redline: [7400, 8400] },
  inline_six: { label: 'Inline six, OHC', cylinders: 6, bore: [3.950, 4.050], stroke: [4.100, 4.250], rod: [6.000, 6.250], chamber: [52, 62], redline: [6800, 7600] },
}

export const DEMO_SHOPS: DemoShop[] = [
  {
    owner: { name: 'Marisol Tenney', email: 'marisol@harrow-creek.test' },
    shopName: 'Harrow Creek Engine Works', slug: 'harrow-creek-engine-works', region: 'Lower Basin',
    bio: 'Three-bay machine shop with an engine dyno cell. Pushrod V8s for bracket and heads-up drag classes, built to a displacement cap.',
    specialties: ['Drag', 'Class-legal displacement'], capabilities: ['In-house engine dyno', 'Block machining', 'Balancing'],
    families: ['small_block', 'big_block'], aspirations: ['na', 'nitrous'],
  },
  {
    owner: { name: 'Gideon Aldous', email: 'gideon@ninefold.test' },
    shopName: 'Ninefold Machine', slug: 'ninefold-machine', region: 'North Ridge',
    bio: 'CNC porting and boosted four-valve engines. Every long block is broken in and mapped on our own dyno before it ships.',
    specialties: ['Boosted street', 'Road course'], capabilities: ['CNC porting', 'In-house engine dyno', 'Calibration'],
    families: ['dohc_v8', 'small_block'], aspirations: ['turbo', 'supercharged'],
  },
  {
    owner: { name: 'Priya Castellan', email: 'priya@cinderflats.test' },
    shopName: 'Cinder Flats Performance', slug: 'cinder-flats-performance', region: 'Red Mesa',
    bio: 'Off-road and desert engines that live at wide-open throttle for hours. Cooling and oiling first, peak numbers second.',
    specialties: ['Off-road', 'Endurance'], capabilities: ['Block machining', 'Chassis dyno', 'Oiling system design'],
    families: ['small_block', 'inline_six'], aspirations: ['na', 'supercharged'],
  },
  {
    owner: { name: 'Tobias Wren', email: 'tobias@kestrelbay.test' },
    shopName: 'Kestrel Bay Marine Power', slug: 'kestrel-bay-marine-power', region: 'Eastern Shore',
    bio: 'Big-inch marine engines for offshore and lake racing, freshwater-cooled and dyno-proven under sustained load.',
    specialties: ['Marine', 'Big inch'], capabilities: ['In-house engine dyno', 'Marine cooling', 'Balancing'],
    families: ['big_block', 'tall_deck'], aspirations: ['na', 'supercharged'],
  },
  {
    owner: { name: 'Hollis Varga', email: 'hollis@tallgrass.test' },
    shopName: 'Tallgrass Racing Engines', slug: 'tallgrass-racing-engines', region: 'Prairie Line',
    bio: 'Methanol and race-gas drag engines. Tight tolerances, full documentation, and every pull file published with the build.',
    specialties: ['Drag', 'Methanol'], capabilities: ['Block machining', 'CNC porting', 'In-house engine dyno'],
    families: ['big_block', 'tall_deck', 'small_block'], aspirations: ['na', 'nitrous'],
  },
  {
    owner: { name: 'Ines Marchetti', email: 'ines@ironvale.test' },
    shopName: 'Ironvale Cylinder Co.', slug: 'ironvale-cylinder-co', region: 'Riverlands',
    bio: 'Inline sixes and small V8s for road courses and street cars that see track days. Flat curves over peak figures.',
    specialties: ['Road course', 'Street'], capabilities: ['Cylinder head work', 'Chassis dyno', 'Calibration'],
    families: ['inline_six', 'dohc_v8'], aspirations: ['na', 'turbo'],
  },
  {
    owner: { name: 'Darnell Oakes', email: 'darnell@brightwater.test' },
    shopName: 'Brightwater Dyno & Machine', slug: 'brightwater-dyno-and-machine', region: 'Valley Floor',
    bio: 'Turbocharged street/strip engines on E85. We size the fuel system with the engine and hand over the whole map.',
    specialties: ['Street/strip', 'E85'], capabilities: ['In-house engine dyno', 'Fuel system sizing', 'Calibration'],
    families: ['small_block', 'dohc_v8'], aspirations: ['turbo', 'nitrous'],
  },
  {
    owner: { name: 'Ruth Abernathy', email: 'ruth@quarryroad.test' },
    shopName: 'Quarry Road Speed', slug: 'quarry-road-speed', region: 'Pine Hollow',
    bio: 'Small shop, long waiting list. Supercharged big blocks and tall-deck engines for heads-up drag racing.',
    specialties: ['Drag', 'Supercharged'], capabilities: ['Block machining', 'Balancing', 'In-house engine dyno'],
    families: ['big_block', 'tall_deck'], aspirations: ['supercharged', 'turbo'],
  },
]

export const DEMO_RACERS = [
  { name: 'Jonah Pelletier', email: 'jonah@racer.test' },
  { name: 'Alma Ruiz-Boyd', email: 'alma@racer.test' },
  { name: 'Keon Marsh', email: 'keon@racer.test' },
  { name: 'Freya Lindqvist', email: 'freya@racer.test' },
  { name: 'Samir Haddad', email: 'samir@racer.test' },
]

export const DEMO_ADMIN = { name: 'Torquewright Review Desk', email: 'admin@torquewright.test' }

export interface DemoPull {
  label: string
  dynoKind: 'engine' | 'chassis'
  declaredStandard: 'SAE_J1349_2004' | 'SAE_J1349_1990' | 'SAE_J607' | 'DIN_70020'
  weather: { baroInHg: number, airTempF: number, humidityPct: number }
  points: { rpm: number, lbFt: number, hp: number }[]
  status: 'submitted' | 'verified'
  comparisonRole?: 'baseline' | 'variant'
  changeKind?: 'heads' | 'intake' | 'camshaft' | 'exhaust' | 'tune' | 'other'
  changeNote?: string
  /** Set on the one pull that re-uses another build's curve, for the admin queue. */
  copiedFrom?: string
}

/**
 * A demo build: the combination exactly as the publish schema holds it (shared/schemas/build.ts, so a
 * new combination field is asked for here too), and what the seed needs besides.
 */
export type DemoBuild = PublishableBuild & {
  shopSlug: string
  slug: string
  publishedDaysAgo: number
  parts: { category: string, part: string, partNumber: string, quantity: number, unitPriceCents: number }[]
  pulls: DemoPull[]
}

const round = (value: number, places: number) => Math.round(value * 10 ** places) / 10 ** places

/** Specific output (hp per cubic inch) a well-built combination of this kind makes; invented bands of common practice. */
function specificOutput(r: Random, aspiration: Aspiration, fuel: Fuel): number {
  const base: Record<Aspiration, [number, number]> = { na: [1.05, 1.45], turbo: [1.9, 2.9], supercharged: [1.7, 2.5], nitrous: [1.6, 2.2] }
  const fuelBonus: Record<Fuel, number> = { pump_gas: 0, race_gas: 0.12, e85: 0.18, methanol: 0.22 }
  const [lo, hi] = base[aspiration]
  return r.between(lo, hi) * (1 + fuelBonus[fuel] * (aspiration === 'na' ? 0.5 : 1))
}

/** A smooth torque curve: a skewed bell around the torque peak, scaled so peak power hits the target, with small noise. */
export function makeCurve(r: Random, opts: { peakHpTarget: number, redline: number, boosted: boolean, stepRpm: number }) {
  const tqRpm = opts.redline * r.between(opts.boosted ? 0.55 : 0.68, opts.boosted ? 0.66 : 0.76)
  const below = tqRpm * r.between(opts.boosted ? 0.55 : 0.75, opts.boosted ? 0.7 : 0.95)
  const above = (opts.redline - tqRpm) * r.between(1.4, 1.9)
  const startRpm = Math.round((opts.boosted ? 3200 : 2800) / opts.stepRpm) * opts.stepRpm
  const endRpm = Math.round(opts.redline / opts.stepRpm) * opts.stepRpm
  // A gentle ripple of its own (the tuning of runners and headers) gives every curve a shape no other build shares.
  const rippleAmp = r.between(0.012, 0.03)
  const rippleWave = r.between(1400, 2600)
  const ripplePhase = r.between(0, 2 * Math.PI)
  const shape: { rpm: number, tq: number }[] = []
  for (let rpm = startRpm; rpm <= endRpm; rpm += opts.stepRpm) {
    const x = (rpm - tqRpm) / (rpm < tqRpm ? below : above)
    const ripple = 1 + rippleAmp * Math.sin((2 * Math.PI * rpm) / rippleWave + ripplePhase)
    shape.push({ rpm, tq: Math.exp(-x * x) * ripple })
  }
  const peakShapeHp = Math.max(...shape.map(p => (p.tq * p.rpm) / 5252))
  const scale = opts.peakHpTarget / peakShapeHp
  return shape.map((p) => {
    const lbFt = round(p.tq * scale * (1 + r.between(-0.003, 0.003)), 1)
    return { rpm: p.rpm, lbFt, hp: round((lbFt * p.rpm) / 5252, 1) }
  })
}

const HEADS: Record<FamilyKey, string[]> = {
  small_block: ['Aluminum 23° heads, CNC-ported', 'Aluminum 18° heads, hand-finished runners', 'Cast-iron 23° heads, bowl-blended'],
  big_block: ['Aluminum rectangle-port heads, CNC-ported', 'Aluminum oval-port heads, street porting'],
  tall_deck: ['Aluminum raised-runner heads, CNC-ported', 'Billet-capped spread-port heads'],
  dohc_v8: ['Four-valve heads, CNC-ported, stock valve sizes', 'Four-valve heads, oversize valves, ported'],
  inline_six: ['Crossflow aluminum head, ported', 'Single-cam head, bowl work and 1 mm oversize valves'],
}

const INTAKES: Record<Aspiration, string[]> = {
  na: ['Single-plane intake, port-matched', 'Dual-plane intake, divided plenum', 'Individual runner intake'],
  turbo: ['Fabricated sheet-metal intake, forward-facing throttle', 'Cast boost-rated intake, tall plenum'],
  supercharged: ['Roots-style blower on a matched manifold', 'Centrifugal blower into a fabricated plenum'],
  nitrous: ['Single-plane intake with plate system', 'Direct-port nitrous on a sheet-metal intake'],
}

const MANAGEMENT = ['Standalone sequential EFI, wideband closed loop', 'Standalone EFI with boost control', 'Throttle-body EFI, self-learning', 'Carburetor with electronic ignition']

const USE_FOR: Record<string, Use[]> = {
  'Drag': ['drag', 'street_strip'], 'Marine': ['marine'], 'Off-road': ['off_road'], 'Road course': ['road_course'],
  'Street': ['street', 'street_strip'], 'Street/strip': ['street_strip'], 'Boosted street': ['street', 'street_strip'],
  'Methanol': ['drag'], 'Class-legal displacement': ['drag'], 'Endurance': ['off_road'], 'E85': ['street_strip'],
  'Big inch': ['marine', 'drag'], 'Supercharged': ['drag'],
}

const ASPIRATION_WORDS: Record<Aspiration, string> = { na: 'naturally aspirated', turbo: 'twin-turbo', supercharged: 'supercharged', nitrous: 'nitrous-assisted' }
const USE_WORDS: Record<Use, string> = { drag: 'drag', road_course: 'road course', street_strip: 'street/strip', off_road: 'off-road', marine: 'marine', street: 'street' }
const FUEL_WORDS: Record<Fuel, string> = { pump_gas: 'pump gas', race_gas: 'race gas', e85: 'E85', methanol: 'methanol' }

/**
 * A build's price from its parts list: the parts and labor times the shop's margin, rounded up to whole
 * hundreds of dollars. The labor line carries the margin, so the parts list adds up to the price exactly.
 */
function priced(margin: number, publishedDaysAgo: number, parts: DemoBuild['parts']) {
  const partsCents = parts.reduce((sum, p) => sum + p.quantity * p.unitPriceCents, 0)
  const priceCents = Math.ceil((partsCents * margin) / 10_000) * 10_000
  const labor = parts.find(p => p.category === 'Labor')!
  labor.unitPriceCents += priceCents - partsCents
  return { priceCents, publishedDaysAgo, parts }
}

function partsList(r: Random, b: { family: FamilyKey, aspiration: Aspiration, fuel: Fuel, strokeIn: number, rodLengthIn: number, shopCode: string, injectors: number | null, heads: string, intake: string }) {
  const code = (cat: string, n: number) => `${b.shopCode}-${cat}-${String(n).padStart(3, '0')}`
  const c = (dollars: number) => Math.round(dollars * r.between(0.9, 1.15)) * 100
  const rows = [
    { category: 'Block', part: b.family === 'inline_six' ? 'Iron inline-six block, align-honed, decked' : 'Aluminum V8 block, sleeved, four-bolt mains', partNumber: code('BK', r.int(1, 99)), quantity: 1, unitPriceCents: c(b.family === 'inline_six' ? 1800 : 4200) },
    { category: 'Rotating assembly', part: `Forged 4340 crankshaft, ${b.strokeIn.toFixed(3)} in stroke`, partNumber: code('CR', r.int(1, 99)), quantity: 1, unitPriceCents: c(1900) },
    { category: 'Rotating assembly', part: `H-beam connecting rods, ${b.rodLengthIn.toFixed(3)} in`, partNumber: code('RD', r.int(1, 99)), quantity: 1, unitPriceCents: c(1250) },
    { category: 'Rotating assembly', part: b.aspiration === 'na' ? 'Forged pistons, gas-ported, 1.0 mm top ring' : 'Forged pistons, thick crown for boost', partNumber: code('PS', r.int(1, 99)), quantity: 1, unitPriceCents: c(1100) },
    { category: 'Rotating assembly', part: 'Ring set, file-fit', partNumber: code('RG', r.int(1, 99)), quantity: 1, unitPriceCents: c(240) },
    // The draws stay (the scenario is the same on every run); the parts list names the build's own heads and intake.
    { category: 'Cylinder heads', part: (r.pick(HEADS[b.family]), b.heads), partNumber: code('HD', r.int(1, 99)), quantity: b.family === 'inline_six' ? 1 : 2, unitPriceCents: c(1700) },
    { category: 'Camshaft and valvetrain', part: 'Roller camshaft, custom grind', partNumber: code('CM', r.int(1, 99)), quantity: 1, unitPriceCents: c(650) },
    { category: 'Camshaft and valvetrain', part: 'Roller lifters and pushrods, measured length', partNumber: code('VT', r.int(1, 99)), quantity: 1, unitPriceCents: c(900) },
    { category: 'Induction', part: (r.pick(INTAKES[b.aspiration]), b.intake), partNumber: code('IN', r.int(1, 99)), quantity: 1, unitPriceCents: c(b.aspiration === 'supercharged' ? 5200 : 900) },
    { category: 'Fuel system', part: b.injectors ? `High-impedance injectors (set of ${b.injectors})` : 'Carburetor, blow-through ready', partNumber: code('FS', r.int(1, 99)), quantity: 1, unitPriceCents: c(850) },
    { category: 'Oiling', part: 'Wet-sump pan, baffled, with high-volume pump', partNumber: code('OL', r.int(1, 99)), quantity: 1, unitPriceCents: c(700) },
    { category: 'Gaskets and fasteners', part: 'Multi-layer steel head gaskets, head studs', partNumber: code('GS', r.int(1, 99)), quantity: 1, unitPriceCents: c(520) },
    { category: 'Labor', part: 'Machining, balancing, assembly and dyno time', partNumber: code('LB', 1), quantity: 1, unitPriceCents: c(4800) },
  ]
  if (b.aspiration === 'turbo') rows.splice(9, 0, { category: 'Induction', part: 'Turbochargers, 76 mm compressor, with wastegates', partNumber: code('TB', r.int(1, 99)), quantity: 2, unitPriceCents: c(1900) })
  if (b.aspiration === 'nitrous') rows.splice(9, 0, { category: 'Induction', part: 'Nitrous plate kit with purge and window switch', partNumber: code('NX', r.int(1, 99)), quantity: 1, unitPriceCents: c(1400) })
  return rows
}

const CHANGES = [
  { kind: 'heads', note: 'CNC-ported heads in place of the out-of-box castings', baseline: 'Baseline with out-of-box heads', top: 0.055, low: -0.012 },
  { kind: 'camshaft', note: 'Longer-duration camshaft, 4° wider lobe separation', baseline: 'Baseline with the milder camshaft', top: 0.07, low: -0.045 },
  { kind: 'intake', note: 'Single-plane intake in place of the dual-plane', baseline: 'Baseline with the dual-plane intake', top: 0.04, low: -0.03 },
  { kind: 'exhaust', note: 'Larger primary headers with longer collectors', baseline: 'Baseline on the smaller headers', top: 0.025, low: 0.008 },
  { kind: 'tune', note: 'Timing and fuel re-mapped on the dyno', baseline: 'Baseline on the starting map', top: 0.03, low: 0.02 },
] as const

/** The same short block before a change: the final curve with the change's gain taken out, smoothly across the rpm range. */
function baselineOf(points: DemoPull['points'], change: (typeof CHANGES)[number]) {
  const first = points[0]!.rpm
  const last = points[points.length - 1]!.rpm
  const pivot = first + (last - first) * 0.55
  const width = (last - first) * 0.12
  return points.map((p) => {
    const s = 1 / (1 + Math.exp(-(p.rpm - pivot) / width))
    const gain = change.low + (change.top - change.low) * s
    const lbFt = round(p.lbFt / (1 + gain), 1)
    return { rpm: p.rpm, lbFt, hp: round((lbFt * p.rpm) / 5252, 1) }
  })
}

/** Builds the whole scenario deterministically: the same shops, builds and curves on every run. */
export function demoBuilds(): DemoBuild[] {
  const r = seededRandom(20261201)
  const out: DemoBuild[] = []
  const fuels: Fuel[] = ['pump_gas', 'race_gas', 'e85', 'methanol']
  DEMO_SHOPS.forEach((shop, shopIndex) => {
    const shopCode = shop.shopName.split(/\s+/).map(w => w[0]).join('').replace(/[^A-Z]/g, '').slice(0, 3)
    const count = shopIndex < 4 ? 6 : 5
    for (let i = 0; i < count; i++) {
      const familyKey = shop.families[i % shop.families.length] as FamilyKey
      const family = FAMILIES[familyKey]
      const aspiration = shop.aspirations[(i + shopIndex) % shop.aspirations.length] as Aspiration
      const fuel: Fuel = aspiration === 'turbo' ? r.pick(['e85', 'race_gas', 'pump_gas'] as const) : r.pick(fuels)
      const boreIn = round(r.between(...family.bore), 3)
      const strokeIn = round(r.between(...family.stroke), 3)
      const rodLengthIn = round(r.between(...family.rod), 3)
      const ci = (Math.PI / 4) * boreIn * boreIn * strokeIn * family.cylinders
      const redline = Math.round(r.between(...family.redline) / 100) * 100
      const peakHpTarget = ci * specificOutput(r, aspiration, fuel)
      const boosted = aspiration === 'turbo' || aspiration === 'supercharged'
      const stepRpm = r.pick([50, 100, 100, 250])
      const intakeDuration = round(r.between(boosted ? 226 : 236, boosted ? 246 : 272), 0)
      const injectors = r.next() < 0.8 ? family.cylinders : null
      const use = r.pick(USE_FOR[r.pick(shop.specialties)] ?? (['street_strip'] as Use[]))
      const litres = ci * 0.016387064
      const title = `${Math.round(ci)} ci ${ASPIRATION_WORDS[aspiration]} ${family.label.replace(/^(\S+)/, m => m.toLowerCase())} on ${FUEL_WORDS[fuel]}`
      const slug = `${shop.slug.split('-')[0]}-${Math.round(ci)}-${aspiration}-${fuel.replace('_', '-')}-${i + 1}`
      const weather = () => ({ baroInHg: round(r.between(28.6, 30.2), 2), airTempF: round(r.between(55, 95), 1), humidityPct: round(r.between(20, 75), 0) })
      const declaredStandard = r.pick(['SAE_J1349_2004', 'SAE_J1349_2004', 'SAE_J1349_1990', 'SAE_J607', 'DIN_70020'] as const)
      const pulls: DemoPull[] = [{
        label: 'Final pull on the engine dyno',
        dynoKind: familyKey === 'inline_six' && r.next() < 0.5 ? 'chassis' : 'engine',
        declaredStandard,
        weather: weather(),
        points: makeCurve(r, { peakHpTarget, redline, boosted, stepRpm }),
        status: shopIndex === 7 && i >= 3 ? 'submitted' : 'verified',
      }]
      // Every third build also publishes the pull from before its last change, on the same short block.
      if (i % 3 === 1) {
        const change = CHANGES[(shopIndex + i) % CHANGES.length]!
        const final = pulls[0]!
        final.label = `After: ${change.note.charAt(0).toLowerCase()}${change.note.slice(1)}`
        final.comparisonRole = 'variant'
        final.changeKind = change.kind
        final.changeNote = change.note
        pulls.push({ ...final, label: change.baseline, comparisonRole: 'baseline', changeKind: undefined, changeNote: undefined, weather: weather(), points: baselineOf(final.points, change) })
      }
      const build: Omit<DemoBuild, 'priceCents' | 'publishedDaysAgo' | 'parts'> = {
        shopSlug: shop.slug,
        slug,
        title: title.charAt(0).toUpperCase() + title.slice(1),
        summary: `${litres.toFixed(1)}-liter ${family.label.toLowerCase()} built by ${shop.shopName} for ${USE_WORDS[use]} use on ${FUEL_WORDS[fuel]}. ${aspiration === 'na' ? 'No power adder. ' : ''}Dyno-proven before delivery, with the raw pull file attached.`,
        engineFamily: family.label,
        cylinders: family.cylinders,
        boreIn,
        strokeIn,
        rodLengthIn,
        cylinderHeads: r.pick(HEADS[familyKey]),
        chamberCc: round(r.between(...family.chamber), 1),
        pistonCc: round(boosted ? r.between(8, 22) : r.between(-14, 6), 1),
        gasketBoreIn: round(boreIn + 0.04, 3),
        gasketThicknessIn: r.pick([0.027, 0.040, 0.041, 0.051]),
        deckClearanceIn: r.pick([0, 0.005, 0.008, 0.010]),
        camIntakeDurationDeg: intakeDuration,
        camExhaustDurationDeg: intakeDuration + r.pick([4, 6, 8, 10]),
        camIntakeLiftIn: round(r.between(0.580, 0.720), 3),
        camExhaustLiftIn: round(r.between(0.560, 0.700), 3),
        camLobeSeparationDeg: boosted ? r.pick([114, 115, 116, 118]) : r.pick([106, 108, 110, 112]),
        camIntakeCenterlineDeg: boosted ? r.pick([110, 112, 114]) : r.pick([102, 104, 106, 108]),
        intakeManifold: r.pick(INTAKES[aspiration]),
        throttleBody: r.pick(['Single 102 mm throttle body', 'Single 105 mm throttle body', '1250 cfm four-barrel', 'Twin 75 mm throttle bodies']),
        injectorSizeLbHr: injectors ? r.pick([60, 83, 120, 160, 220]) : null,
        injectorCount: injectors,
        fuel,
        aspiration,
        engineManagement: r.pick(boosted ? MANAGEMENT.slice(0, 2) : [MANAGEMENT[0]!, ...MANAGEMENT.slice(2)]),
        intendedUse: use,
        pulls,
      }
      // The as-built price is the parts and labor with the shop's margin, rounded up to $100.
      const margin = r.between(1.12, 1.6)
      const daysAgo = r.int(1, 420)
      out.push({ ...build, ...priced(margin, daysAgo, partsList(r, { family: familyKey, aspiration, fuel, strokeIn, rodLengthIn, shopCode, injectors, heads: build.cylinderHeads, intake: build.intakeManifold })) })
    }
  })
  // One submitted pull on a later shop's build re-uses an earlier build's curve, rescaled and at another rpm step:
  // the evidence check has to catch it.
  const original = out[2]
  const copy = [...out].reverse().find(b => b.pulls.length === 1)
  if (original && copy && original.pulls[0] && copy.pulls[0]) {
    const source = original.pulls[0].points.filter((_, index) => index % 2 === 0)
    copy.pulls[0] = {
      ...copy.pulls[0],
      label: 'Final pull (resubmitted)',
      status: 'submitted',
      copiedFrom: original.slug,
      points: source.map(p => ({ rpm: p.rpm, lbFt: round(p.lbFt * 1.02, 1), hp: round((round(p.lbFt * 1.02, 1) * p.rpm) / 5252, 1) })),
    }
  }
  return out
}

/** A pull file in Torquewright's own plain CSV layout. */
export function pullCsv(points: { rpm: number, lbFt: number, hp: number }[]): string {
  return ['rpm,torque_lbft,power_hp', ...points.map(p => `${p.rpm},${p.lbFt.toFixed(1)},${p.hp.toFixed(1)}`)].join('\n') + '\n'
}
