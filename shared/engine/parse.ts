/**
 * Reading raw pull files: CSV, semicolon or tab separated, with a header naming rpm and torque
 * and/or power in either unit system. Never throws: bad input comes back as errors with rows.
 */
import Papa from 'papaparse'
import { show, text as textArg } from './guard'
import { FIGURE_CEILING, PULL_MAX_PREAMBLE_ROWS, PULL_MAX_ROWS, RPM_CEILING } from './limits'
import { HP_TORQUE_CROSSOVER_RPM } from './power'
import type { ParseColumns, ParseError, ParseResult, PowerUnit, PullPoint, TorqueUnit } from './types'
import { NM_PER_LBFT, W_PER_HP, W_PER_PS } from './units'

export const PARSE_LIMITS = {
  /** Most data rows a pull file may hold (PULL_MAX_ROWS: 20,000, several times the longest real pull). */
  maxRows: PULL_MAX_ROWS,
  /** Highest rpm a row may give (the module's RPM_CEILING). */
  maxRpm: RPM_CEILING,
  /** Largest power (hp) or torque (lb·ft) a row may give once converted (the module's FIGURE_CEILING). */
  maxFigure: FIGURE_CEILING,
  /** Fewest data rows that make a curve. */
  minRows: 3,
  /** Row errors listed before the rest are counted in one line. */
  maxListedErrors: 50,
  /** Lines above the header that may be skipped (a title, the shop's notes). */
  maxPreambleRows: PULL_MAX_PREAMBLE_ROWS,
} as const

type Delimiter = ParseColumns['delimiter']
type Kind = 'rpm' | 'torque' | 'power'

interface Classified {
  kind: Kind
  torqueUnit?: TorqueUnit
  powerUnit?: PowerUnit
  /** The header named its unit (otherwise lb·ft or hp is assumed). */
  unitStated: boolean
}

const NOT_ENGINE_SPEED = new Set(['mph', 'kmh', 'kph', 'km', 'mi', 'wheel', 'roller', 'drum', 'ms', 'vehicle', 'road', 'fan', 'turbo', 'shaft'])
const POWER_WORDS = new Set(['hp', 'bhp', 'whp', 'kw', 'ps', 'cv', 'pwr', 'horsepower', 'leistung'])
const TORQUE_WORDS = new Set(['tq', 'trq', 'torq', 'nm', 'lbft', 'ftlb', 'lbfft', 'ftlbf', 'ftlbs', 'lbsft', 'drehmoment'])

/** Lower-case alphanumeric tokens of a header cell ("Torque (N·m)" → torque, nm). */
function tokensOf(cell: string): string[] {
  const text = cell.toLowerCase().replace(/[·⋅•∙]/g, '').replace(/\bn[\s.-]m\b/g, 'nm').replace(/\blbs?[\s.-]?f?[\s.-]?ft\b/g, 'lbft').replace(/\bft[\s.-]?lbs?f?\b/g, 'ftlb')
  return text.split(/[^a-z0-9]+/).filter(Boolean)
}

/** What a header cell names: rpm, torque (with unit) or power (with unit); null for anything else. */
export function classifyHeader(cell: string): Classified | null {
  textArg('cell', cell)
  const tokens = tokensOf(cell)
  if (tokens.length === 0) return null
  const has = (word: string): boolean => tokens.includes(word)
  const compact = tokens.join('')
  if (compact.includes('torque') || tokens.some(t => TORQUE_WORDS.has(t))) {
    if (has('nm') || compact.includes('newton')) return { kind: 'torque', torqueUnit: 'nm', unitStated: true }
    const stated = ['lbft', 'ftlb', 'lbfft', 'ftlbf', 'ftlbs', 'lbsft'].some(has)
    return { kind: 'torque', torqueUnit: 'lbft', unitStated: stated }
  }
  if (compact.includes('power') || compact.includes('horsepower') || tokens.some(t => POWER_WORDS.has(t))) {
    if (has('kw')) return { kind: 'power', powerUnit: 'kw', unitStated: true }
    if (has('ps') || has('cv')) return { kind: 'power', powerUnit: 'ps', unitStated: true }
    const stated = ['hp', 'bhp', 'whp', 'horsepower'].some(has)
    return { kind: 'power', powerUnit: 'hp', unitStated: stated }
  }
  if (compact.includes('rpm') || has('revs') || has('drehzahl') || compact.includes('1min') || compact.includes('min1')) {
    return { kind: 'rpm', unitStated: true }
  }
  if (has('speed') && !tokens.some(t => NOT_ENGINE_SPEED.has(t))) return { kind: 'rpm', unitStated: false }
  return null
}

/** A number from a cell, accepting a decimal comma; null for an empty cell, a RangeError for text that is not a number. */
export function parseNumberCell(raw: string | undefined): number | null {
  if (raw !== undefined && typeof raw !== 'string') throw new RangeError(`raw must be the text of a cell (got ${show(raw)})`)
  const value = cellNumber(raw)
  if (value !== null && Number.isNaN(value)) throw new RangeError(`raw ${shown(raw)} is not a number`)
  return value
}

/** parseNumberCell for the parser's own loop: NaN for text, so a row's problems can be listed without throwing. */
function cellNumber(raw: string | undefined): number | null {
  if (raw === undefined || raw.length === 0) return null
  // Trim only when needed: this runs on every cell of files with up to 20,000 rows.
  const s = raw.charCodeAt(0) <= 32 || raw.charCodeAt(raw.length - 1) <= 32 ? raw.trim() : raw
  if (s === '') return null
  const quick = simpleDecimal(s)
  if (quick !== null) return quick
  if (!NUMBER.test(s)) return Number.NaN
  return s.indexOf(',') < 0 ? Number(s) : Number(s.replace(',', '.'))
}

const POW10 = [1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15]

/**
 * Fast path for plain decimals of up to 15 digits ("6512.25", "-3,5"): the digits form an exact
 * integer and one correctly rounded division gives the same double as Number() would.
 * Anything else returns null and takes the general path.
 */
function simpleDecimal(s: string): number | null {
  let i = 0
  let negative = false
  const first = s.charCodeAt(0)
  if (first === 45) {
    negative = true
    i = 1
  }
  else if (first === 43) {
    i = 1
  }
  let mantissa = 0
  let digits = 0
  let fraction = 0
  let seenPoint = false
  for (; i < s.length; i++) {
    const c = s.charCodeAt(i)
    if (c >= 48 && c <= 57) {
      mantissa = mantissa * 10 + (c - 48)
      digits++
      if (seenPoint) fraction++
    }
    else if ((c === 46 || c === 44) && !seenPoint) seenPoint = true
    else return null
  }
  if (digits === 0 || digits > 15) return null
  const value = fraction ? mantissa / (POW10[fraction] as number) : mantissa
  return negative ? -value : value
}

/** A plain decimal number, with a decimal point or a decimal comma and an optional exponent. */
const NUMBER = /^[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?$/

/** True when every cell of a row is empty or blank. */
function isBlankRow(cells: readonly string[]): boolean {
  for (const c of cells) {
    if (c.length > 0 && (c.charCodeAt(0) > 32 || c.trim() !== '')) return false
  }
  return true
}

interface HeaderFound {
  delimiter: Delimiter
  rowIndex: number
  columns: Array<Classified | null>
  cells: string[]
}

/** Looks through the first rows with each delimiter for a header naming rpm and torque or power. */
function findHeader(text: string): HeaderFound | null {
  const head = text.slice(0, 65_536)
  let best: (HeaderFound & { score: number }) | null = null
  for (const delimiter of ['\t', ';', ','] as const) {
    const rows = Papa.parse<string[]>(head, { delimiter, preview: PARSE_LIMITS.maxPreambleRows + 1 }).data
    for (let r = 0; r < rows.length; r++) {
      const cells = rows[r] ?? []
      const columns = cells.map(c => classifyHeader(String(c)))
      const kinds = new Set(columns.filter(c => c !== null).map(c => (c as Classified).kind))
      if (!kinds.has('rpm') || !(kinds.has('torque') || kinds.has('power'))) continue
      const score = kinds.size * 1000 + cells.length
      if (!best || r < best.rowIndex || (r === best.rowIndex && score > best.score)) {
        best = { delimiter, rowIndex: r, columns, cells: cells.map(String), score }
      }
      break
    }
  }
  return best
}

/** Text from a string or bytes (UTF-8, or UTF-16 with a byte-order mark); null when it is binary. */
function decode(input: unknown): string | null {
  if (typeof input === 'string') return input
  let bytes: Uint8Array | null = null
  if (input instanceof Uint8Array) bytes = input
  else if (input instanceof ArrayBuffer) bytes = new Uint8Array(input)
  if (!bytes) throw new TypeError('expected the file as text or bytes')
  if (bytes[0] === 0xff && bytes[1] === 0xfe) return new TextDecoder('utf-16le').decode(bytes.subarray(2))
  if (bytes[0] === 0xfe && bytes[1] === 0xff) return new TextDecoder('utf-16be').decode(bytes.subarray(2))
  const probe = bytes.subarray(0, 8192)
  if (probe.includes(0)) return null
  return new TextDecoder('utf-8').decode(bytes)
}

/** NUL characters, or more than 5 % control or undecodable characters near the start, mean a binary file. */
function looksBinary(text: string): boolean {
  const probe = text.slice(0, 8192)
  let odd = 0
  for (let i = 0; i < probe.length; i++) {
    const c = probe.charCodeAt(i)
    if (c === 0) return true
    if ((c < 32 && c !== 9 && c !== 10 && c !== 13 && c !== 12) || c === 0xfffd) odd++
  }
  return probe.length > 0 && odd / probe.length > 0.05
}

const shown = (text: string | undefined): string => `"${String(text ?? '').trim().slice(0, 40)}"`

/** What is wrong with one data row's cells, or null when nothing is (no closures: it runs on every row). */
function rowProblems(
  rpm: number | null, rpmText: string | undefined,
  tq: number | null, tqText: string | undefined,
  pw: number | null, pwText: string | undefined,
): string[] | null {
  const fine = rpm !== null && rpm > 0 && rpm <= RPM_CEILING && (tq === null || tq >= 0) && (pw === null || pw >= 0) && (tq !== null || pw !== null)
  if (fine) return null // NaN fails every comparison above, so a text cell never lands here
  const out: string[] = []
  if (rpm === null) out.push('The rpm cell is empty.')
  else if (Number.isNaN(rpm)) out.push(`rpm ${shown(rpmText)} is not a number.`)
  else if (rpm <= 0) out.push(`rpm ${rpm} must be above zero.`)
  else if (rpm > RPM_CEILING) out.push(`rpm ${rpm} is above the ${RPM_CEILING.toLocaleString('en-US')} rpm ceiling no engine pull reaches: check the rpm column (is it in rpm, not a wheel or roller speed?).`)
  if (tq !== null && Number.isNaN(tq)) out.push(`Torque ${shown(tqText)} is not a number.`)
  if (pw !== null && Number.isNaN(pw)) out.push(`Power ${shown(pwText)} is not a number.`)
  if (tq === null && pw === null) out.push('The row has neither torque nor power.')
  if ((tq !== null && tq < 0) || (pw !== null && pw < 0)) out.push('Torque and power cannot be negative in a pull.')
  return out
}

const hasComma = (cell: string | undefined): boolean => cell !== undefined && cell.indexOf(',') >= 0

const fail = (errors: ParseError[]): ParseResult => ({ ok: false, errors })
const fileError = (message: string): ParseResult => fail([{ row: 0, message }])

const toLbFt = (value: number, unit: TorqueUnit): number => (unit === 'nm' ? value / NM_PER_LBFT : value)
const toHp = (value: number, unit: PowerUnit): number =>
  unit === 'kw' ? (value * 1000) / W_PER_HP : unit === 'ps' ? (value * W_PER_PS) / W_PER_HP : value

const UNIT_LABEL: Record<TorqueUnit | PowerUnit, string> = { lbft: 'lb·ft', nm: 'N·m', hp: 'hp', kw: 'kW', ps: 'PS' }

/** Parse a pull file into points (hp and lb·ft on every point) or a list of errors with 1-based rows. */
export function parsePull(input: string | Uint8Array | ArrayBuffer): ParseResult {
  try {
    return parseText(input)
  }
  catch (error) {
    const reason = error instanceof Error ? error.message : String(error)
    return fileError(`The file could not be read (${reason}).`)
  }
}

function parseText(input: unknown): ParseResult {
  if (input === null || input === undefined) return fileError('No file was given.')
  const decoded = decode(input)
  if (decoded === null || looksBinary(decoded)) {
    return fileError('This looks like a binary file, not a text pull file: export the pull as CSV or tab-separated text.')
  }
  const text = decoded.charCodeAt(0) === 0xfeff ? decoded.slice(1) : decoded
  if (!/\S/.test(text)) return fileError('The file is empty.')

  const header = findHeader(text)
  if (!header) {
    return fileError(
      'No header row naming an rpm column and a torque or power column was found. '
      + 'Row 1 should read like: RPM,Torque (lb-ft),Power (hp).',
    )
  }

  const warnings: string[] = []
  const previewRows = header.rowIndex + 2 + PARSE_LIMITS.maxRows + 1
  const parsed = Papa.parse<string[]>(text, { delimiter: header.delimiter, preview: previewRows, skipEmptyLines: false })
  const rows = parsed.data
  const headerRow = header.rowIndex + 1

  // A second header line that gives only units ("rpm | lb-ft | hp") is merged into the first.
  let firstData = header.rowIndex + 1
  let columns = header.columns
  const maybeUnits = rows[firstData]
  if (maybeUnits && maybeUnits.some(c => c.trim() !== '') && maybeUnits.every(c => cellNumber(c) === null || Number.isNaN(cellNumber(c) as number))) {
    const merged = header.cells.map((c, i) => classifyHeader(`${c} ${maybeUnits[i] ?? ''}`))
    const unitHits = maybeUnits.filter(c => classifyHeader(c) !== null).length
    if (unitHits > 0) {
      columns = merged
      firstData++
      warnings.push(`Row ${firstData} was read as a row of units under the header.`)
    }
  }

  const pick = (kind: Kind): { index: number, info: Classified } | null => {
    const found = columns.flatMap((c, index) => (c && c.kind === kind ? [{ index, info: c }] : []))
    const chosen = found[0]
    if (!chosen) return null
    if (found.length > 1) {
      const others = found.slice(1).map(f => `"${header.cells[f.index]}"`).join(', ')
      warnings.push(`More than one ${kind} column: using "${header.cells[chosen.index]}" and ignoring ${others}.`)
    }
    return chosen
  }
  const rpmCol = pick('rpm')
  const tqCol = pick('torque')
  const hpCol = pick('power')
  if (!rpmCol || (!tqCol && !hpCol)) return fileError('The header must name an rpm column and a torque or power column.')
  if (header.rowIndex > 0) warnings.push(`Skipped ${header.rowIndex} line(s) above the header on row ${headerRow}.`)
  if (tqCol && !tqCol.info.unitStated) warnings.push(`The torque column "${header.cells[tqCol.index]}" gives no unit; it was read as lb·ft.`)
  if (hpCol && !hpCol.info.unitStated) warnings.push(`The power column "${header.cells[hpCol.index]}" gives no unit; it was read as hp.`)
  if (!tqCol) warnings.push('The file gives power only; torque was computed as hp × 5252.11 / rpm.')
  if (!hpCol) warnings.push('The file gives torque only; power was computed as lb·ft × rpm / 5252.11.')

  const torqueUnit: TorqueUnit = tqCol?.info.torqueUnit ?? 'lbft'
  const powerUnit: PowerUnit = hpCol?.info.powerUnit ?? 'hp'
  const errors: ParseError[] = []
  let extraErrors = 0
  const addError = (row: number, message: string): void => {
    if (errors.length < PARSE_LIMITS.maxListedErrors) errors.push({ row, message })
    else extraErrors++
  }
  for (const e of parsed.errors) {
    if (e.code === 'MissingQuotes' || e.code === 'InvalidQuotes') addError((e.row ?? 0) + 1, `Quote marks do not pair up: ${e.message}.`)
  }

  const points: PullPoint[] = []
  let previousRpm = -Infinity
  let decimalComma = false
  let filledRows = 0
  let dataRows = 0
  const limit = rows.length
  for (let r = firstData; r < limit; r++) {
    const cells = rows[r] as string[]
    const rowNo = r + 1
    if (isBlankRow(cells)) continue
    dataRows++
    if (dataRows > PARSE_LIMITS.maxRows) {
      return fileError(`The file has more than ${PARSE_LIMITS.maxRows.toLocaleString('en-US')} data rows, more than any dyno pull logs (a few hundred samples a second over tens of seconds); trim it to the pull itself.`)
    }
    const rpmText = cells[rpmCol.index]
    const tqText = tqCol ? cells[tqCol.index] : undefined
    const pwText = hpCol ? cells[hpCol.index] : undefined
    const rpm = cellNumber(rpmText)
    const tq = cellNumber(tqText)
    const pw = cellNumber(pwText)
    const problems = rowProblems(rpm, rpmText, tq, tqText, pw, pwText)
    if (problems || rpm === null) {
      for (const message of problems ?? []) addError(rowNo, message)
      continue
    }
    if (rpm <= previousRpm) {
      addError(rowNo, `rpm goes backwards or repeats: ${rpm} after ${previousRpm}. A pull must rise in rpm down the file.`)
    }
    previousRpm = rpm
    if (!decimalComma && (hasComma(rpmText) || hasComma(tqText) || hasComma(pwText))) decimalComma = true
    let lbFt = tq === null ? null : toLbFt(tq, torqueUnit)
    let hp = pw === null ? null : toHp(pw, powerUnit)
    if (hp === null && lbFt !== null) {
      hp = (lbFt * rpm) / HP_TORQUE_CROSSOVER_RPM
      if (hpCol) filledRows++
    }
    if (lbFt === null && hp !== null) {
      lbFt = (hp * HP_TORQUE_CROSSOVER_RPM) / rpm
      if (tqCol) filledRows++
    }
    if ((hp as number) > FIGURE_CEILING || (lbFt as number) > FIGURE_CEILING) {
      addError(rowNo, `Power or torque above ${FIGURE_CEILING.toLocaleString('en-US')} (hp or lb·ft) is beyond any engine: check the columns and their units.`)
      continue
    }
    points.push({ rpm, hp: hp as number, lbFt: lbFt as number })
  }

  if (dataRows === 0) return fileError('The file has a header but no data rows.')
  if (dataRows < PARSE_LIMITS.minRows) {
    addError(0, `A pull needs at least ${PARSE_LIMITS.minRows} data rows; this file has ${dataRows}.`)
  }
  if (extraErrors > 0) errors.push({ row: 0, message: `…and ${extraErrors} more problem(s) not listed.` })
  if (errors.length > 0) return fail(errors)
  if (filledRows > 0) warnings.push(`${filledRows} row(s) had one of torque or power missing; it was computed from the other.`)
  if (decimalComma) warnings.push('Decimal commas were read as decimal points.')

  return {
    ok: true,
    points,
    columns: {
      rpm: { header: header.cells[rpmCol.index] ?? '', index: rpmCol.index },
      torque: tqCol ? { header: header.cells[tqCol.index] ?? '', index: tqCol.index, unit: torqueUnit } : null,
      power: hpCol ? { header: header.cells[hpCol.index] ?? '', index: hpCol.index, unit: powerUnit } : null,
      delimiter: header.delimiter,
      decimalComma,
    },
    warnings,
  }
}

/** Units of the columns read, for display ("N·m", "kW"). */
export function columnUnitLabel(unit: TorqueUnit | PowerUnit): string {
  if (typeof unit !== 'string' || !Object.hasOwn(UNIT_LABEL, unit)) throw new RangeError(`unit must be one of ${Object.keys(UNIT_LABEL).join(', ')} (got ${show(unit)})`)
  return UNIT_LABEL[unit]
}
