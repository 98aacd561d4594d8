/** Input guards: every public function rejects impossible input with a RangeError that names the field. */

function show(value: unknown): string {
  return typeof value === 'number' ? String(value) : typeof value
}

/** A finite number, or a RangeError naming the field. */
export function finite(name: string, value: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new RangeError(`${name} must be a finite number (got ${show(value)})`)
  }
  return value
}

/** A finite number greater than zero. */
export function positive(name: string, value: number): number {
  finite(name, value)
  if (value <= 0) throw new RangeError(`${name} must be greater than zero (got ${value})`)
  return value
}

/** A finite number of zero or more. */
export function nonNegative(name: string, value: number): number {
  finite(name, value)
  if (value < 0) throw new RangeError(`${name} cannot be negative (got ${value})`)
  return value
}

/** A whole number of one or more. */
export function positiveInteger(name: string, value: number): number {
  positive(name, value)
  if (!Number.isInteger(value)) throw new RangeError(`${name} must be a whole number (got ${value})`)
  return value
}

/** A finite number inside [min, max]. */
export function within(name: string, value: number, min: number, max: number, unit = ''): number {
  finite(name, value)
  if (value < min || value > max) {
    const u = unit ? ` ${unit}` : ''
    throw new RangeError(`${name} must lie between ${min} and ${max}${u} (got ${value})`)
  }
  return value
}
