/**
 * Benchmark of the engine module's pull path: parse a 10,000-row CSV pull, run the evidence
 * checks and resample it, many times, and report the median. Target: under 50 ms a run.
 * Run alone with `npx tsx bench/engine.ts`; `npm run bench` calls benchEngine().
 */
import { pathToFileURL } from 'node:url'
import { checkEvidence, correctionFactor, parsePull, resample } from '../shared/engine'
import type { Weather } from '../shared/engine'

export interface BenchResult {
  name: string
  medianMs: number
  runs: number
}

const ROWS = 10_000
const RUNS = 25
const K_5252 = 33000 / (2 * Math.PI)

/** An invented smooth pull from 2,500 to 7,500 rpm, logged as a fine sweep with a little noise. */
export function inventedPullCsv(rows = ROWS): string {
  const lines = ['RPM,Torque (lb-ft),Power (hp)']
  let seed = 12345
  const noise = (): number => {
    seed = (seed * 1103515245 + 12345) % 2147483648
    return seed / 2147483648 - 0.5
  }
  for (let i = 0; i < rows; i++) {
    const rpm = 2500 + (5000 * i) / (rows - 1)
    const lbFt = (470 - 0.000018 * (rpm - 5000) ** 2) * (1 + 0.002 * noise())
    lines.push(`${rpm.toFixed(2)},${lbFt.toFixed(2)},${((lbFt * rpm) / K_5252).toFixed(2)}`)
  }
  return lines.join('\n')
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b)
  const mid = sorted.length >> 1
  return sorted.length % 2 ? (sorted[mid] as number) : ((sorted[mid - 1] as number) + (sorted[mid] as number)) / 2
}

/** Parse, check and resample a 10,000-row pull RUNS times; the median wall time of one pass. */
export async function benchEngine(): Promise<BenchResult[]> {
  const csv = inventedPullCsv()
  const weather: Weather = { baroInHg: 29.4, airTempF: 77, humidityPct: 40 }
  const pass = (): void => {
    const parsed = parsePull(csv)
    if (!parsed.ok) throw new Error(`bench pull did not parse: ${parsed.errors[0]?.message}`)
    checkEvidence(
      { points: parsed.points, columns: parsed.columns, weather, declared: { standard: 'SAE_J1349_2004', correctionFactor: correctionFactor('SAE_J1349_2004', weather) } },
      { aspiration: 'na', displacementCi: 427, strokeIn: 4, fingerprintsOfOtherBuilds: [] },
    )
    resample(parsed.points, 50)
  }
  for (let i = 0; i < 3; i++) pass() // warm-up
  const times: number[] = []
  for (let i = 0; i < RUNS; i++) {
    const start = performance.now()
    pass()
    times.push(performance.now() - start)
  }
  return [{ name: `engine: parse + check + resample, ${ROWS.toLocaleString('en-US')}-row pull`, medianMs: median(times), runs: RUNS }]
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  for (const r of await benchEngine()) console.log(`${r.name}: median ${r.medianMs.toFixed(2)} ms over ${r.runs} runs (target < 50 ms)`)
}
