/**
 * Feeds random and adversarial arguments to every function the engine module exports, inside a
 * worker: each call must return or throw a RangeError, and what it returns must hold no NaN.
 * Before each call the worker tells the test which call it is, so a call that never returns is named.
 */
import { parentPort, workerData } from 'node:worker_threads'
import fc from 'fast-check'
import * as engine from '../../../../shared/engine'
import type { PullPoint } from '../../../../shared/engine'

const { numRuns, seed } = workerData as { numRuns: number, seed: number }
const port = parentPort!
const failures: string[] = []
let calls = 0

const describe = (value: unknown): string => {
  // Huge arrays are summarised rather than written out in full.
  if (Array.isArray(value) && value.some(v => Array.isArray(v) && v.length > 1000)) return `[${value.map(v => (Array.isArray(v) ? `${v.length} items` : typeof v)).join(', ')}]`
  try {
    const s = JSON.stringify(value, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? String(v) : typeof v === 'function' ? 'fn' : v))
    return s === undefined ? String(value) : s.length > 300 ? `${s.slice(0, 300)}…` : s
  }
  catch {
    return String(value)
  }
}

/** The first NaN inside a value (numbers, arrays and plain objects, a bounded walk), as a path; null when none. */
function findNaN(value: unknown, path = 'result', depth = 0, budget = { left: 200_000 }): string | null {
  if (--budget.left < 0 || depth > 6) return null
  if (typeof value === 'number') return Number.isNaN(value) ? path : null
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const hit = findNaN(value[i], `${path}[${i}]`, depth + 1, budget)
      if (hit) return hit
    }
    return null
  }
  if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      const hit = findNaN(v, `${path}.${k}`, depth + 1, budget)
      if (hit) return hit
    }
  }
  return null
}

/** One call; limitMs is the guard the test applies (1 s, more only for the deliberately huge fixed pulls). */
function call(name: string, fn: (...args: unknown[]) => unknown, args: unknown[], limitMs = 1000): void {
  calls++
  port.postMessage({ type: 'call', name, args: describe(args), limitMs })
  try {
    const result = fn(...args)
    const nan = findNaN(result)
    if (nan) failures.push(`${name}(${describe(args)}) returned NaN at ${nan}`)
  }
  catch (error) {
    if (!(error instanceof RangeError)) {
      failures.push(`${name}(${describe(args)}) threw ${(error as Error)?.constructor?.name ?? typeof error}: ${(error as Error)?.message ?? String(error)}`)
    }
  }
}

// Numbers a careless or hostile caller might send, beside ordinary ones.
const nasty = fc.constantFrom(0, -0, -1, 1, 0.5, 5e-324, 1e-12, 1e8, 1e11, 1e300, -1e300, Number.MAX_VALUE, Infinity, -Infinity, NaN, 6500, 25_000, 25_001)
const num = fc.oneof(nasty, fc.double(), fc.double({ min: -10_000, max: 10_000, noNaN: true }), fc.integer({ min: -100, max: 30_000 }))
const junk = fc.oneof(fc.constant(null), fc.constant(undefined), fc.string({ maxLength: 20 }), fc.boolean(), fc.constant({}), fc.constant([]))

/** Rising rpm from random steps; sometimes a last point far past the ceiling (1e8, 1e11). */
const risingCurve = fc.tuple(
  fc.double({ min: 0, max: 9000, noNaN: true }),
  fc.array(fc.tuple(fc.double({ min: 1e-9, max: 2000, noNaN: true }), fc.double({ min: -100, max: 2000, noNaN: true }), fc.boolean()), { minLength: 0, maxLength: 40 }),
  fc.constantFrom(null, 1e8, 1e11, 0),
).map(([start, steps, last]) => {
  let rpm = start
  const points: PullPoint[] = steps.map(([dr, hp, withTq]) => {
    rpm += dr
    return withTq ? { rpm, hp, lbFt: rpm > 0 ? (hp * 5252.113) / rpm : hp } : { rpm, hp }
  })
  if (last !== null) points.push({ rpm: last, hp: 100, lbFt: 100 })
  return points
})
const point = fc.record({ rpm: num, hp: num, lbFt: fc.option(num, { nil: undefined }) }, { requiredKeys: ['rpm', 'hp'] })
const curve = fc.oneof(risingCurve, fc.array(fc.oneof(point, junk), { maxLength: 8 }))

// Every argument name the module's object arguments use, so records reach past the first guard.
const KEYS = [
  'boreIn', 'strokeIn', 'chamberCc', 'pistonCc', 'gasketBoreIn', 'gasketThicknessIn', 'deckClearanceIn', 'rodLengthIn', 'intakeClosesAbdcDeg',
  'intakeDurationDeg', 'exhaustDurationDeg', 'lobeSeparationDeg', 'intakeCenterlineDeg', 'hp', 'bsfc', 'injectors', 'maxDutyCycle',
  'baroInHg', 'airTempF', 'humidityPct', 'stepRpm', 'evenHp', 'fromRpm', 'toRpm', 'maxGainHp', 'maxLossHp', 'averageDeltaHp',
] as const
const sensible: Record<string, number> = {
  boreIn: 4, strokeIn: 3.5, chamberCc: 64, pistonCc: 5, gasketBoreIn: 4.1, gasketThicknessIn: 0.04, deckClearanceIn: 0, rodLengthIn: 5.7,
  intakeClosesAbdcDeg: 40, intakeDurationDeg: 230, exhaustDurationDeg: 236, lobeSeparationDeg: 110, intakeCenterlineDeg: 106, hp: 500,
  bsfc: 0.5, injectors: 8, maxDutyCycle: 0.8, baroInHg: 29.5, airTempF: 80, humidityPct: 40, stepRpm: 100, evenHp: 1, fromRpm: 3000,
  toRpm: 7000, maxGainHp: 5, maxLossHp: 2, averageDeltaHp: 1,
}
/** Records that are sensible except for a few fields, so each guard further in is reached too. */
const spoiled = fc.dictionary(fc.constantFrom(...KEYS), fc.oneof(num, junk), { maxKeys: 4 }).map(over => ({ ...sensible, ...over }))
const standard = fc.oneof(fc.constantFrom(...engine.CORRECTION_STANDARDS.map(s => s.id)), fc.string({ maxLength: 8 }), junk)
const spec = fc.oneof(fc.record({ standard, weather: fc.oneof(spoiled, junk) }), junk)
const timingBasis = fc.oneof(fc.constantFrom('lift050', 'seat'), junk)

/** Pull files: CSV of a curve, with garbage cells and lines, sometimes as bytes. */
const pullText = fc.tuple(
  fc.constantFrom('RPM,Torque (lb-ft),Power (hp)', 'rpm;kW', 'Drehzahl\tNm', 'speed,hp', 'nonsense'),
  fc.array(fc.oneof(
    fc.tuple(num, num, num).map(([a, b, c]) => `${a},${b},${c}`),
    fc.string({ maxLength: 30 }),
    fc.constantFrom('3000,400,228', '1e11,400,300', '1e8,1,1', '0,0,0', '"unpaired,1,2', ''),
  ), { maxLength: 30 }),
  fc.boolean(),
).map(([header, rows, bytes]) => {
  const text = [header, ...rows].join('\n')
  return bytes ? new TextEncoder().encode(text) : text
})

const anything = fc.oneof(num, junk, curve, spoiled, standard, spec, timingBasis, pullText, fc.constant((p: PullPoint) => p.hp), fc.constant(() => Number.NaN))
/** Arguments shaped for each export where a shape is known; random ones for every position as well. */
const shaped: Record<string, fc.Arbitrary<unknown[]>> = {
  rpmGrid: fc.tuple(num, num, num),
  resample: fc.tuple(curve, num),
  deltaCurve: fc.tuple(curve, curve, fc.oneof(spoiled, junk, fc.record({ stepRpm: num }))),
  describeDelta: fc.tuple(fc.oneof(spoiled, junk, fc.record({ fromRpm: num, toRpm: num, evenHp: num, maxGainHp: num, maxLossHp: num, averageDeltaHp: num, regions: fc.array(spoiled, { maxLength: 3 }) }))),
  bandAverage: fc.tuple(curve, num, num, fc.constantFrom((p: PullPoint) => p.hp, () => Number.NaN, null)),
  averagePower: fc.tuple(curve, num, num),
  averageTorque: fc.tuple(curve, num, num),
  powerBandRpm: fc.tuple(curve, num),
  valueAt: fc.tuple(curve, num, fc.constantFrom((p: PullPoint) => p.hp, () => Number.NaN, null)),
  hpAt: fc.tuple(curve, num),
  peaks: fc.tuple(curve),
  convertCurve: fc.tuple(curve, spec, spec),
  curveFingerprint: fc.tuple(curve),
  checkEvidence: fc.tuple(
    fc.oneof(junk, fc.record({ points: curve, declared: fc.oneof(junk, fc.record({ standard, correctionFactor: num, peakHp: num, peakHpRpm: num })), weather: fc.oneof(spoiled, junk) })),
    fc.oneof(junk, fc.record({ aspiration: fc.constantFrom('na', 'turbo', 'x'), displacementCi: num, strokeIn: num, fingerprintsOfOtherBuilds: fc.constant([{ buildId: 1, fingerprint: 'f1.c.AAAA' }]) })),
  ),
  parsePull: fc.tuple(pullText),
  dynamicCompressionRatio: fc.tuple(fc.tuple(spoiled, timingBasis).map(([r, basis]) => ({ ...r, timingBasis: basis }))),
  seatIntakeClosingAbdcDeg: fc.tuple(num, timingBasis),
  correctionFactor: fc.tuple(standard, fc.oneof(spoiled, junk)),
  correctionValidity: fc.tuple(standard, fc.oneof(spoiled, junk)),
}

const functions = Object.entries(engine).filter(([, v]) => typeof v === 'function') as [string, (...args: unknown[]) => unknown][]
port.postMessage({ type: 'functions', names: functions.map(([n]) => n) })

for (const [name, fn] of functions) {
  const args = fc.oneof(shaped[name] ?? fc.array(anything, { maxLength: 4 }), fc.array(anything, { maxLength: 4 }))
  fc.assert(fc.property(args, (a) => {
    call(name, fn, a)
  }), { numRuns, seed })
}

// The files and calls that brought the process down before the module was bounded.
const manyPoints = (n: number): PullPoint[] => Array.from({ length: n }, (_, i) => ({ rpm: 1000 + i * 0.15, hp: 300 + (i % 7), lbFt: 400 }))
const fixed: [string, unknown[], number?][] = [
  ['parsePull', ['RPM,Torque (lb-ft),Power (hp)\n3000,400,228.5\n3500,410,273.2\n1e11,415,316.1\n']],
  ['parsePull', ['RPM,Torque (lb-ft),Power (hp)\n3000,400,228.5\n3500,410,273.2\n1e8,415,316.1\n']],
  ['curveFingerprint', [[{ rpm: 3000, hp: 228 }, { rpm: 3500, hp: 273 }, { rpm: 1e11, hp: 316 }]]],
  ['curveFingerprint', [[{ rpm: 3000, hp: 228 }, { rpm: 3500, hp: 273 }, { rpm: 1e8, hp: 316 }]]],
  ['rpmGrid', [0, Infinity, 100]],
  ['rpmGrid', [0, 1e9, 1e-6]],
  ['resample', [manyPoints(10), 1e-9]],
  ['deltaCurve', [manyPoints(10), manyPoints(10), { stepRpm: 1e-9 }]],
  // 130,000 points overflowed Math.max(...); the guard here is looser since the pull is 6 times the row bound on purpose.
  ['checkEvidence', [{ points: manyPoints(130_000), declared: { standard: 'UNCORRECTED' } }, { aspiration: 'na', displacementCi: 350, strokeIn: 3.5 }], 10_000],
  ['peaks', [[{ rpm: 0, hp: 10 }, { rpm: 1000, hp: 20 }]]],
  ['averageTorque', [[{ rpm: 0, hp: 10 }, { rpm: 1000, hp: 20 }], 0, 1000]],
  ['camEvents', [null]],
  ['injectorSizeLbHr', [undefined]],
  ['convertCurve', [[null], { standard: 'UNCORRECTED' }, { standard: 'UNCORRECTED' }]],
  ['powerBandRpm', [[{ rpm: 3000, hp: -5 }, { rpm: 4000, hp: -10 }, { rpm: 5000, hp: -20 }], 0.9]],
  ['hpAt', [manyPoints(10), 20_000]],
]
for (const [name, args, limitMs] of fixed) call(name, (engine as unknown as Record<string, (...a: unknown[]) => unknown>)[name]!, args, limitMs)

port.postMessage({ type: 'done', failures, calls })
