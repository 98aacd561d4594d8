/** Small building blocks of the numeric side of the index: growable typed arrays, dictionaries, the band average and a top-k heap. */
import { CURVE_MIN_RPM, CURVE_POINTS, CURVE_STEP_RPM } from './types'

export type Column = Float64Array | Float32Array | Int32Array | Uint32Array | Uint8Array | Int16Array

/** A copy of `array` with room for `size` elements. */
export function grown<T extends Column>(array: T, size: number): T {
  const next = new (array.constructor as new (n: number) => T)(size)
  next.set(array.length > size ? array.subarray(0, size) as T : array)
  return next
}

/** Strings to small codes (families, regions), with how many live documents use each. */
export class Dictionary {
  readonly values: string[] = []
  private codes = new Map<string, number>()
  private uses: number[] = []

  code(value: string): number {
    let c = this.codes.get(value)
    if (c === undefined) {
      c = this.values.length
      this.codes.set(value, c)
      this.values.push(value)
      this.uses.push(0)
    }
    return c
  }

  find(value: string): number | undefined {
    return this.codes.get(value)
  }

  retain(code: number): void {
    this.uses[code] = (this.uses[code] ?? 0) + 1
  }

  release(code: number): void {
    this.uses[code] = (this.uses[code] ?? 1) - 1
  }

  inUse(code: number): boolean {
    return (this.uses[code] ?? 0) > 0
  }

  clear(): void {
    this.values.length = 0
    this.codes.clear()
    this.uses.length = 0
  }
}

/** Linear interpolation of the curve at `base` at fractional grid index x (x ≤ last). */
function valueAtGrid(curves: Float32Array, base: number, last: number, x: number): number {
  const k = Math.min(Math.floor(x), last - 1)
  const y0 = curves[base + k] as number
  return y0 + ((curves[base + k + 1] as number) - y0) * (x - k)
}

/**
 * Mean power over [fromRpm, toRpm] of a slot's curve on the grid, by the trapezoid rule over its
 * linear interpolant; NaN when the curve does not cover the whole band. `areas` holds the running
 * trapezoid area from the curve's first grid point, so the cost does not grow with the band.
 */
export function bandAverageOnGrid(curves: Float32Array, areas: Float32Array, slot: number, first: number, last: number, fromRpm: number, toRpm: number): number {
  if (first < 0) return Number.NaN
  const a = (fromRpm - CURVE_MIN_RPM) / CURVE_STEP_RPM
  const b = (toRpm - CURVE_MIN_RPM) / CURVE_STEP_RPM
  if (a < first || b > last || b <= a) return Number.NaN
  const base = slot * CURVE_POINTS
  const ka = Math.min(Math.floor(a), last - 1)
  const kb = Math.min(Math.floor(b), last - 1)
  const ya = valueAtGrid(curves, base, last, a)
  const yb = valueAtGrid(curves, base, last, b)
  const areaA = (areas[base + ka] as number) + (((curves[base + ka] as number) + ya) / 2) * (a - ka)
  const areaB = (areas[base + kb] as number) + (((curves[base + kb] as number) + yb) / 2) * (b - kb)
  return (areaB - areaA) / (b - a)
}

/** Writes the running trapezoid areas of a slot's curve between grid points first and last. */
export function fillAreas(curves: Float32Array, areas: Float32Array, slot: number, first: number, last: number): void {
  const base = slot * CURVE_POINTS
  let area = 0
  for (let k = first; k <= last; k++) {
    if (k > first) area += ((curves[base + k - 1] as number) + (curves[base + k] as number)) / 2
    areas[base + k] = area
  }
}

/**
 * The k best of a stream by (key ascending, id ascending): a max-heap of the k best so far, so
 * most candidates are turned away with one comparison.
 */
export class TopK {
  private keys: Float64Array
  private ids: Float64Array
  private slots: Int32Array
  size = 0

  constructor(private readonly k: number) {
    this.keys = new Float64Array(k)
    this.ids = new Float64Array(k)
    this.slots = new Int32Array(k)
  }

  /** a is worse than b. */
  private worse(ka: number, ia: number, kb: number, ib: number): boolean {
    return ka > kb || (ka === kb && ia > ib)
  }

  offer(key: number, id: number, slot: number): void {
    if (this.k === 0) return
    if (this.size < this.k) {
      let i = this.size++
      while (i > 0) {
        const parent = (i - 1) >> 1
        if (!this.worse(key, id, this.keys[parent] as number, this.ids[parent] as number)) break
        this.move(parent, i)
        i = parent
      }
      this.put(i, key, id, slot)
      return
    }
    if (!this.worse(this.keys[0] as number, this.ids[0] as number, key, id)) return
    let i = 0
    for (;;) {
      const l = 2 * i + 1
      if (l >= this.size) break
      const r = l + 1
      let child = l
      if (r < this.size && this.worse(this.keys[r] as number, this.ids[r] as number, this.keys[l] as number, this.ids[l] as number)) child = r
      if (!this.worse(this.keys[child] as number, this.ids[child] as number, key, id)) break
      this.move(child, i)
      i = child
    }
    this.put(i, key, id, slot)
  }

  private move(from: number, to: number): void {
    this.keys[to] = this.keys[from] as number
    this.ids[to] = this.ids[from] as number
    this.slots[to] = this.slots[from] as number
  }

  private put(i: number, key: number, id: number, slot: number): void {
    this.keys[i] = key
    this.ids[i] = id
    this.slots[i] = slot
  }

  /** The kept slots, best first. */
  sorted(): number[] {
    const order = Array.from({ length: this.size }, (_, i) => i)
    order.sort((a, b) => {
      const ka = this.keys[a] as number
      const kb = this.keys[b] as number
      return ka < kb ? -1 : ka > kb ? 1 : (this.ids[a] as number) - (this.ids[b] as number)
    })
    return order.map(i => this.slots[i] as number)
  }
}
