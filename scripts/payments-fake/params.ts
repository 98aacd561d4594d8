// Reading the API's parameters the way the real one does: unknown keys, missing and malformed
// values are 400s that name the parameter.
import { ApiError, invalid, missing, unknownParam } from './errors'
import type { FormObject, FormValue } from './form'

/** A parameter's name as the API spells it: `line_items[0][price_data][currency]`. */
export const paramName = (prefix: string, key: string) => (prefix ? `${prefix}[${key}]` : key)

/** Refuses any key that the endpoint does not take. */
export function allowOnly(params: FormObject, allowed: readonly string[], prefix = ''): void {
  for (const key of Object.keys(params)) {
    if (!allowed.includes(key)) throw unknownParam(paramName(prefix, key))
  }
}

export function optionalString(params: FormObject, key: string, prefix = ''): string | null {
  const v = params[key]
  if (v === undefined || v === '') return null
  if (typeof v !== 'string') throw invalid(paramName(prefix, key), `Invalid string: ${paramName(prefix, key)} must be a string.`)
  return v
}

export function requiredString(params: FormObject, key: string, prefix = ''): string {
  const v = optionalString(params, key, prefix)
  if (v === null) throw missing(paramName(prefix, key))
  return v
}

export function optionalInteger(params: FormObject, key: string, prefix = ''): number | null {
  const v = optionalString(params, key, prefix)
  if (v === null) return null
  if (!/^-?\d+$/.test(v) || !Number.isSafeInteger(Number(v))) {
    throw invalid(paramName(prefix, key), `Invalid integer: ${v}`, 'parameter_invalid_integer')
  }
  return Number(v)
}

export function requiredInteger(params: FormObject, key: string, prefix = ''): number {
  const v = optionalInteger(params, key, prefix)
  if (v === null) throw missing(paramName(prefix, key))
  return v
}

export function optionalObject(params: FormObject, key: string, prefix = ''): FormObject | null {
  const v = params[key]
  if (v === undefined || v === '') return null
  if (typeof v === 'string' || Array.isArray(v)) throw invalid(paramName(prefix, key), `Invalid object: ${paramName(prefix, key)} must be a hash.`, 'parameter_invalid_object')
  return v
}

export function optionalArray(params: FormObject, key: string, prefix = ''): FormValue[] | null {
  const v = params[key]
  if (v === undefined || v === '') return null
  if (!Array.isArray(v)) throw invalid(paramName(prefix, key), `Invalid array: ${paramName(prefix, key)} must be an array.`, 'parameter_invalid_array')
  return v
}

/** Metadata as the API limits it: at most 50 keys, keys up to 40 characters, values up to 500. */
export function metadata(params: FormObject, key = 'metadata', prefix = ''): Record<string, string> {
  const raw = optionalObject(params, key, prefix)
  if (!raw) return {}
  const out: Record<string, string> = {}
  const keys = Object.keys(raw)
  if (keys.length > 50) throw invalid(paramName(prefix, key), 'Metadata can have at most 50 keys.')
  for (const k of keys) {
    const v = raw[k]
    if (typeof v !== 'string') throw invalid(`${paramName(prefix, key)}[${k}]`, `Invalid metadata value for ${k}: it must be a string.`)
    if (k.length > 40) throw invalid(`${paramName(prefix, key)}[${k}]`, 'Metadata keys can be at most 40 characters long.')
    if (v.length > 500) throw invalid(`${paramName(prefix, key)}[${k}]`, 'Metadata values can be at most 500 characters long.')
    out[k] = v
  }
  return out
}

export function enumValue<T extends string>(params: FormObject, key: string, values: readonly T[], prefix = ''): T | null {
  const v = optionalString(params, key, prefix)
  if (v === null) return null
  if (!values.includes(v as T)) {
    throw new ApiError(400, 'invalid_request_error', `Invalid ${paramName(prefix, key)}: must be one of ${values.join(', ')}`, { code: 'parameter_invalid_string', param: paramName(prefix, key) })
  }
  return v as T
}

export function currency(value: string, param: string): string {
  const c = value.toLowerCase()
  if (!/^[a-z]{3}$/.test(c)) throw invalid(param, `Invalid currency: ${value}. A currency is a three-letter ISO code.`)
  return c
}
