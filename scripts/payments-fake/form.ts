// Form-encoded request bodies as the Stripe API reads them: `a[b][0][c]=v` nests objects and arrays.

export type FormValue = string | FormValue[] | { [key: string]: FormValue }
export type FormObject = { [key: string]: FormValue }

/** Splits `line_items[0][price_data][currency]` into its path segments. */
function keyPath(key: string): string[] | null {
  const head = key.match(/^[^[\]]+/)
  if (!head) return null
  const path = [head[0]]
  const rest = key.slice(head[0].length)
  const re = /\[([^[\]]*)\]/g
  let consumed = 0
  for (const m of rest.matchAll(re)) {
    if (m.index !== consumed) return null
    path.push(m[1] ?? '')
    consumed += m[0].length
  }
  return consumed === rest.length ? path : null
}

/** Objects whose keys are all array indices (0, 1, …) become arrays, in index order. */
function arrayify(value: FormValue): FormValue {
  if (typeof value === 'string' || Array.isArray(value)) return value
  const keys = Object.keys(value)
  for (const k of keys) value[k] = arrayify(value[k]!)
  if (keys.length > 0 && keys.every(k => /^\d+$/.test(k))) {
    return keys.map(Number).sort((a, b) => a - b).map(i => value[String(i)]!)
  }
  return value
}

export class FormError extends Error {
  constructor(message: string, readonly param: string) {
    super(message)
  }
}

/** Parses an application/x-www-form-urlencoded body into nested objects and arrays. */
export function parseForm(body: string): FormObject {
  const root: FormObject = {}
  for (const [key, raw] of new URLSearchParams(body)) {
    const path = keyPath(key)
    if (!path) throw new FormError(`Invalid parameter name: ${key}`, key)
    let node: FormObject = root
    for (let i = 0; i < path.length; i++) {
      let segment = path[i]!
      const last = i === path.length - 1
      if (segment === '') segment = String(Object.keys(node).length) // `a[]=x` appends
      if (last) {
        node[segment] = raw
      }
      else {
        const next = node[segment]
        if (next === undefined || typeof next === 'string' || Array.isArray(next)) {
          if (typeof next === 'string') throw new FormError(`Invalid parameter: ${path.slice(0, i + 1).join('.')} is both a value and an object`, key)
          node[segment] = {}
        }
        node = node[segment] as FormObject
      }
    }
  }
  for (const k of Object.keys(root)) root[k] = arrayify(root[k]!)
  return root
}

/** A stable text of the parameters, so an idempotency key can be checked against the body it was first used with. */
export function canonicalForm(value: FormValue): string {
  if (typeof value === 'string') return JSON.stringify(value)
  if (Array.isArray(value)) return `[${value.map(canonicalForm).join(',')}]`
  return `{${Object.keys(value).sort().map(k => `${JSON.stringify(k)}:${canonicalForm(value[k]!)}`).join(',')}}`
}
