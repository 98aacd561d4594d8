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

/** Linear interpolation at fractional grid index x (x ≤ last) of a curve whose grid point k sits at values[base + k]. */
function valueAtGrid(values: Float32Array, base: number, last: number, x: number): number {
  const k = Math.min(Math.floor(x), last - 1)
  const y0 = values[base + k] as number
  return y0 + ((values[base + k + 1] as number) - y0) * (x - k)
}

/**
 * Power curves on the rpm grid, each stored only over the grid points its pull covers, in one
 * append-only arena (compacted when removed curves make up most of it), with the running
 * trapezoid area beside every value so a band average costs the same for any band.
 */
export class CurveStore {
  private values = new Float32Array(1 << 16)
  private areas = new Float32Array(1 << 16)
  private length = 0
  private garbage = 0
  private base = new Int32Array(0)
  private first = new Int16Array(0)
  private last = new Int16Array(0)

  reserve(slots: number): void {
    if (slots <= this.base.length) return
    const previous = this.base.length
    this.base = grown(this.base, slots)
    this.first = grown(this.first, slots)
    this.first.fill(-1, previous)
    this.last = grown(this.last, slots)
    this.last.fill(-1, previous)
  }

  reset(): void {
    this.length = 0
    this.garbage = 0
    this.first.fill(-1)
    this.last.fill(-1)
  }

  /** Forgets a slot's curve. */
  clear(slot: number): void {
    const first = this.first[slot] as number
    if (first >= 0) this.garbage += (this.last[slot] as number) - first + 1
    this.first[slot] = -1
    this.last[slot] = -1
  }

  /** Stores hp values for grid points start, start + 1, … (points outside the grid are dropped). */
  set(slot: number, start: number, hp: readonly number[]): void {
    this.clear(slot)
    const first = Math.max(0, start)
    const last = Math.min(CURVE_POINTS - 1, start + hp.length - 1)
    if (last < first) return
    const n = last - first + 1
    if (this.length + n > this.values.length) this.makeRoom(n)
    const offset = this.length
    let area = 0
    for (let k = first; k <= last; k++) {
      const v = hp[k - start] as number
      if (k > first) area += ((this.values[offset + k - first - 1] as number) + v) / 2
      this.values[offset + k - first] = v
      this.areas[offset + k - first] = area
    }
    this.length += n
    this.base[slot] = offset - first
    this.first[slot] = first
    this.last[slot] = last
  }

  private makeRoom(n: number): void {
    const live = this.length - this.garbage
    const size = Math.max(this.values.length, (live + n) * 2)
    const values = this.garbage > this.length / 2 ? new Float32Array(size) : grown(this.values, size)
    const areas = this.garbage > this.length / 2 ? new Float32Array(size) : grown(this.areas, size)
    if (this.garbage > this.length / 2) {
      let w = 0
      for (let slot = 0; slot < this.first.length; slot++) {
        const first = this.first[slot] as number
        if (first < 0) continue
        const count = (this.last[slot] as number) - first + 1
        const from = (this.base[slot] as number) + first
        values.set(this.values.subarray(from, from + count), w)
        areas.set(this.areas.subarray(from, from + count), w)
        this.base[slot] = w - first
        w += count
      }
      this.length = w
      this.garbage = 0
    }
    this.values = values
    this.areas = areas
  }

  /** A slot's curve as stored, or null. */
  get(slot: number): { startRpm: number, hp: number[] } | null {
    const first = this.first[slot] as number
    if (first < 0) return null
    const from = (this.base[slot] as number) + first
    return { startRpm: CURVE_MIN_RPM + first * CURVE_STEP_RPM, hp: Array.from(this.values.subarray(from, from + (this.last[slot] as number) - first + 1)) }
  }

  /**
   * Mean power over [fromRpm, toRpm] by the trapezoid rule over the curve's linear interpolant;
   * NaN when the pull does not cover the whole band.
   */
  average(slot: number, fromRpm: number, toRpm: number): number {
    const first = this.first[slot] as number
    if (first < 0) return Number.NaN
    const last = this.last[slot] as number
    const a = (fromRpm - CURVE_MIN_RPM) / CURVE_STEP_RPM
    const b = (toRpm - CURVE_MIN_RPM) / CURVE_STEP_RPM
    if (a < first || b > last || b <= a) return Number.NaN
    const base = this.base[slot] as number
    const values = this.values
    const ka = Math.min(Math.floor(a), last - 1)
    const kb = Math.min(Math.floor(b), last - 1)
    const ya = valueAtGrid(values, base, last, a)
    const yb = valueAtGrid(values, base, last, b)
    const areaA = (this.areas[base + ka] as number) + (((values[base + ka] as number) + ya) / 2) * (a - ka)
    const areaB = (this.areas[base + kb] as number) + (((values[base + kb] as number) + yb) / 2) * (b - kb)
    return (areaB - areaA) / (b - a)
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
  readonly capacity: number

  constructor(private readonly k: number) {
    this.capacity = k
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

  /** The key a newcomer must beat once the heap is full (Infinity until then). */
  get threshold(): number {
    return this.size < this.k ? Infinity : this.keys[0] as number
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
