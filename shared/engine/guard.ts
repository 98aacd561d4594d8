/** Input guards: every public function rejects impossible input with a RangeError that names the field. */

/**
 * The largest magnitude any figure handed to the module may have. No engine quantity in the
 * module's units (rpm, hp, lb·ft, in, in³, cc, °, inHg, lb/h …) comes near it, and keeping every
 * input under it means no product or square inside the module can overflow into Infinity − Infinity.
 */
export const MAX_MAGNITUDE = 1e9

/** A value as an error message may show it: numbers as written, anything else by its kind (never throws). */
export function show(value: unknown): string {
  if (value === null) return 'null'
  if (typeof value === 'number') return String(value)
  if (typeof value === 'string') return `"${value.slice(0, 40)}"`
  return Array.isArray(value) ? 'an array' : typeof value
}

/** A field name for a message: the given name when it is text, else the fallback. */
export const fieldName = (name: unknown, fallback: string): string => (typeof name === 'string' && name.length > 0 ? name.slice(0, 60) : fallback)

/** A finite number of realistic size, or a RangeError naming the field. */
export function finite(name: string, value: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new RangeError(`${name} must be a finite number (got ${show(value)})`)
  }
  if (Math.abs(value) > MAX_MAGNITUDE) {
    throw new RangeError(`${name} is far too large to be an engine figure (got ${value}; the module accepts up to ${MAX_MAGNITUDE})`)
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

/** A finite number above zero and at most max (a fraction such as a duty cycle: 0 < x ≤ 1). */
export function aboveZeroUpTo(name: string, value: number, max: number, unit = ''): number {
  finite(name, value)
  if (value <= 0 || value > max) {
    const u = unit ? ` ${unit}` : ''
    throw new RangeError(`${name} must be greater than 0 and at most ${max}${u} (got ${value})`)
  }
  return value
}

/** An object (not null, not an array), or a RangeError naming what was expected. */
export function record<T extends object>(name: string, value: T, expected: string): T {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw new RangeError(`${name} must be an object with ${expected} (got ${show(value)})`)
  }
  return value
}

/** A function argument, or a RangeError naming it. */
export function callable<T extends (...args: never[]) => unknown>(name: string, value: T): T {
  if (typeof value !== 'function') throw new RangeError(`${name} must be a function (got ${show(value)})`)
  return value
}

/** A string argument, or a RangeError naming it. */
export function text(name: string, value: string): string {
  if (typeof value !== 'string') throw new RangeError(`${name} must be text (got ${show(value)})`)
  return value
}
