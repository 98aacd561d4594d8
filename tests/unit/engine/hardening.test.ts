import { Worker } from 'node:worker_threads'
import { describe, expect, it } from 'vitest'
import {
  FIGURE_CEILING, MAX_GRID_POINTS, PARSE_LIMITS, RPM_CEILING, averageTorque, camEvents, checkEvidence, convertCurve, curveFingerprint,
  deltaCurve, hpAt, injectorSizeLbHr, parsePull, peaks, powerBandRpm, resample, rpmGrid, valueAt,
} from '../../../shared/engine'
import type { PullPoint } from '../../../shared/engine'
import { PULL_MAX_ROWS, pullTextOverRowBound } from '../../../shared/uploads'
import { inventedPull } from './helpers'

/** Runs the fuzz worker; a call that gives no sign of life for 1 s (a hang) stops it and fails naming the call. */
function fuzz(numRuns: number, seed: number): Promise<{ failures: string[], calls: number, functions: string[] }> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(new URL('./fuzz/worker.mjs', import.meta.url), { workerData: { numRuns, seed } })
    let last = 'loading the module'
    let functions: string[] = []
    let timer: ReturnType<typeof setTimeout> | undefined
    const arm = (limitMs: number) => {
      clearTimeout(timer)
      timer = setTimeout(() => {
        void worker.terminate()
        reject(new Error(`no answer within ${limitMs} ms from ${last}`))
      }, limitMs)
    }
    arm(30_000)
    worker.on('message', (m: { type: string, name?: string, args?: string, limitMs?: number, names?: string[], failures?: string[], calls?: number }) => {
      if (m.type === 'functions') functions = m.names ?? []
      if (m.type === 'call') {
        last = `${m.name}(${m.args})`
        arm(m.limitMs ?? 1000)
      }
      if (m.type === 'done') {
        clearTimeout(timer)
        void worker.terminate()
        resolve({ failures: m.failures ?? [], calls: m.calls ?? 0, functions })
      }
    })
    worker.on('error', (error) => {
      clearTimeout(timer)
      reject(error)
    })
  })
}

describe('nothing from one file or argument can hurt the process (property)', () => {
  it('every exported function, fed random and adversarial files and arguments, returns or throws a RangeError within 1 s, never NaN', async () => {
    const { failures, calls, functions } = await fuzz(300, 20_261_204)
    expect(functions).toEqual(expect.arrayContaining(['parsePull', 'curveFingerprint', 'rpmGrid', 'resample', 'deltaCurve', 'checkEvidence', 'camEvents', 'injectorSizeLbHr', 'convertCurve']))
    expect(functions.length).toBeGreaterThan(60)
    expect(calls).toBeGreaterThan(functions.length * 300)
    expect(failures).toEqual([])
  }, 300_000)
})

const threeRows = (lastRpm: string) => `RPM,Torque (lb-ft),Power (hp)\n3000,400,228.5\n3500,410,273.2\n${lastRpm},415,316.1\n`
const pull = (n: number, step = 0.15): PullPoint[] => Array.from({ length: n }, (_, i) => ({ rpm: 1000 + i * step, hp: 300 + (i % 7), lbFt: 400 }))

describe('the parser bounds rpm and rows', () => {
  it('refuses a row above the 25,000 rpm ceiling by row, naming the ceiling (1e11 and 1e8)', () => {
    expect(RPM_CEILING).toBe(25_000)
    for (const rpm of ['1e11', '1e8', '25001']) {
      const r = parsePull(threeRows(rpm))
      expect(r.ok).toBe(false)
      if (r.ok) return
      expect(r.errors[0]!.row).toBe(4)
      expect(r.errors[0]!.message).toMatch(/above the 25,000 rpm ceiling/)
    }
    expect(parsePull(threeRows('25000')).ok).toBe(true)
  })
  it('refuses power or torque past the figure ceiling', () => {
    const r = parsePull(`RPM,Torque (lb-ft),Power (hp)\n3000,400,228.5\n3500,410,273.2\n4000,1e300,316.1\n`)
    expect(r.ok).toBe(false)
    if (!r.ok) expect(r.errors[0]!.message).toMatch(new RegExp(FIGURE_CEILING.toLocaleString('en-US')))
  })
  it('keeps the row bound at 20,000, and the upload pages\' check never refuses a file the parser would take', () => {
    expect(PARSE_LIMITS.maxRows).toBe(20_000)
    expect(PULL_MAX_ROWS).toBe(PARSE_LIMITS.maxRows)
    const rows = (n: number) => Array.from({ length: n }, (_, i) => `${1000 + i * 0.5},400,${((400 * (1000 + i * 0.5)) / 5252.113).toFixed(2)}`)
    // The most the parser takes: the full preamble, a header, a line of units and 20,000 rows, blank lines between.
    const preamble = Array.from({ length: PARSE_LIMITS.maxPreambleRows }, (_, i) => `Note ${i}`)
    const fullest = [...preamble, 'RPM,Torque,Power', 'rpm,lb-ft,hp', rows(PULL_MAX_ROWS).join('\n\n')].join('\n')
    expect(parsePull(fullest).ok).toBe(true)
    expect(pullTextOverRowBound(fullest)).toBe(false)
    const over = ['RPM,Torque,Power', ...rows(PULL_MAX_ROWS + PARSE_LIMITS.maxPreambleRows + 2)].join('\r\n')
    expect(parsePull(over).ok).toBe(false)
    expect(pullTextOverRowBound(over)).toBe(true)
  })
})

describe('grids and windows are capped', () => {
  it('rpmGrid refuses an endless range and a step that would make too many points', () => {
    expect(() => rpmGrid(0, Infinity, 100)).toThrow(/toRpm must be a finite number/)
    expect(() => rpmGrid(0, 20_000, 0.01)).toThrow(/stepRpm 0.01 gives more than 100,000 grid points/)
    expect(() => rpmGrid(3000, 3000.5, 4e-323)).toThrow(/stepRpm/)
    expect(MAX_GRID_POINTS).toBe(100_000)
    expect(rpmGrid(0, 20_000, 0.25)).toHaveLength(80_001)
  })
  it('resample and deltaCurve refuse a tiny step with a RangeError naming stepRpm', () => {
    expect(() => resample(inventedPull(), 1e-6)).toThrow(/stepRpm/)
    expect(() => deltaCurve(inventedPull(), inventedPull({ peakTq: 460 }), { stepRpm: 1e-6 })).toThrow(/stepRpm/)
  })
  it('curveFingerprint refuses a point past the rpm ceiling instead of building a window per 250 rpm', () => {
    expect(() => curveFingerprint([{ rpm: 3000, hp: 228 }, { rpm: 3500, hp: 273 }, { rpm: 1e11, hp: 316 }])).toThrow(/points\[2\]\.rpm/)
  })
  it('a 130,000-point pull goes through every evidence check without overflowing the call stack', () => {
    const checks = checkEvidence({ points: pull(130_000), declared: { standard: 'UNCORRECTED' } }, { aspiration: 'na', displacementCi: 350, strokeIn: 3.5 })
    for (const id of ['rpm-spacing', 'power-torque-agreement', 'piston-speed'] as const) {
      const c = checks.find(x => x.id === id)!
      expect(c.message, id).not.toMatch(/call stack|could not run/)
    }
    expect(checks.find(c => c.id === 'piston-speed')!.figures.topRpm).toBeCloseTo(1000 + 129_999 * 0.15, 6)
  })
})

describe('nonsense is refused with a RangeError naming the field', () => {
  it('camEvents(null), injectorSizeLbHr(undefined), convertCurve([null])', () => {
    expect(() => camEvents(null as never)).toThrow(RangeError)
    expect(() => camEvents(null as never)).toThrow(/^spec must be an object/)
    expect(() => injectorSizeLbHr(undefined as never)).toThrow(/^input must be an object/)
    expect(() => convertCurve([null as never], { standard: 'UNCORRECTED' }, { standard: 'UNCORRECTED' })).toThrow(/^points\[0\] is not a point/)
  })
  it('rpm 0 is refused rather than leaking NaN into averages and peaks', () => {
    const atZero = [{ rpm: 0, hp: 10 }, { rpm: 1000, hp: 20 }]
    expect(() => peaks(atZero)).toThrow(/points\[0\]\.rpm/)
    expect(() => averageTorque(atZero, 0, 1000)).toThrow(/points\[0\]\.rpm/)
  })
  it('hpAt and valueAt refuse an rpm outside the pull instead of extrapolating', () => {
    const p = inventedPull({ fromRpm: 3000, toRpm: 7000 })
    expect(hpAt(p, 3000)).toBeCloseTo(p[0]!.hp, 9)
    expect(() => hpAt(p, 7500)).toThrow(/lies outside the pull, which runs 3000–7000 rpm/)
    expect(() => valueAt(p, 2000, q => q.hp)).toThrow(/outside the pull/)
  })
  it('powerBandRpm: a falling curve gives a band of positive width from its first point; a curve with no positive power is refused', () => {
    const falling = [{ rpm: 3000, hp: 400 }, { rpm: 4000, hp: 380 }, { rpm: 5000, hp: 300 }, { rpm: 6000, hp: 200 }]
    const band = powerBandRpm(falling, 0.9)
    expect(band.fromRpm).toBe(3000)
    expect(band.reachesStart).toBe(true)
    expect(band.widthRpm).toBeGreaterThan(0)
    // 360 hp (0.9 × 400) falls between 4000 and 5000 rpm: 4000 + 1000 × 20/80.
    expect(band.toRpm).toBeCloseTo(4250, 9)
    expect(() => powerBandRpm([{ rpm: 3000, hp: -5 }, { rpm: 4000, hp: -10 }], 0.9)).toThrow(/power above zero/)
    expect(() => powerBandRpm(falling, 0)).toThrow(/fraction must be greater than 0 and at most 1/)
  })
})
