/** Invented curves and small helpers for the engine-math tests (no real engine's data). */
import { create, all } from 'mathjs'
import type { PullPoint } from '../../../shared/engine'
import { seededRandom } from '../../../shared/random'

/** A private mathjs instance (general-purpose units reference) with inHg added from its mmHg. */
export const math = create(all!, {})
math.createUnit('inHg', '25.4 mmHg')

/** 33,000 ft·lbf/min per hp over 2π, written out here rather than taken from the module. */
export const K_5252 = 33000 / (2 * Math.PI)

export interface CurveShape {
  fromRpm?: number
  toRpm?: number
  stepRpm?: number
  /** Peak torque, lb·ft, and the rpm it falls at. */
  peakTq?: number
  peakTqRpm?: number
  /** Curvature of the torque parabola (lb·ft per rpm²). */
  droop?: number
  /** Relative noise amplitude (deterministic pseudo-noise). */
  noise?: number
  seed?: number
}

/** A deterministic pseudo-random stream: the demo's seeded generator. */
export function rng(seed: number): () => number {
  return seededRandom(seed).next
}

/** An invented smooth pull: a parabolic torque curve with hp = tq × rpm / 5252.11. */
export function inventedPull(shape: CurveShape = {}): PullPoint[] {
  const { fromRpm = 3000, toRpm = 7000, stepRpm = 50, peakTq = 450, peakTqRpm = 4800, droop = 0.00002, noise = 0, seed = 7 } = shape
  const random = rng(seed)
  const points: PullPoint[] = []
  for (let rpm = fromRpm; rpm <= toRpm + 1e-9; rpm += stepRpm) {
    const wobble = noise ? 1 + noise * (2 * random() - 1) : 1
    const lbFt = (peakTq - droop * (rpm - peakTqRpm) ** 2) * wobble
    points.push({ rpm, lbFt, hp: (lbFt * rpm) / K_5252 })
  }
  return points
}

/** Points as CSV text with an imperial header. */
export function toCsv(points: PullPoint[], header = 'RPM,Torque (lb-ft),Power (hp)'): string {
  return [header, ...points.map(p => `${p.rpm},${(p.lbFt ?? 0).toFixed(3)},${p.hp.toFixed(3)}`)].join('\n')
}

/** Relative difference |a − b| / |b|. */
export const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b)
