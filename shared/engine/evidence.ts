/**
 * The automatic evidence report an admin sees beside a raw pull: each check passes, warns or
 * fails, says what to do, and carries the numbers behind it.
 */
import { CORRECTION_STANDARDS } from './types'
import type { Aspiration, EvidenceCheck, EvidenceCheckId, EvidenceContext, EvidenceOutcome, EvidencePull, PullPoint } from './types'
import { correctionFactor, correctionValidity, isCorrectionStandard } from './correction'
import { peaks, torqueAt, valueAt } from './curves'
import { FINGERPRINT_TOLERANCE, curveFingerprint, fingerprintDistance } from './fingerprint'
import { meanPistonSpeedFtMin } from './geometry'
import { HP_TORQUE_CROSSOVER_RPM, bmepKpaFromImperial, bmepPsi } from './power'

/**
 * BMEP bounds at peak torque, kPa. Heywood (Internal Combustion Engine Fundamentals, 1988, §2.7)
 * gives typical maximum BMEP of about 850–1050 kPa for naturally aspirated production SI engines
 * and 1250–1700 kPa turbocharged (quoted from memory). Racing engines go well past those, so the
 * warn and fail thresholds below are Torquewright's own, set from memory of racing figures:
 * warn where only professional racing engines reach, fail where no engine of the kind is known to.
 */
export const BMEP_BOUNDS_KPA: Record<Aspiration, { lowWarn: number, warn: number, fail: number }> = {
  na: { lowWarn: 500, warn: 1550, fail: 1900 },
  turbo: { lowWarn: 500, warn: 3000, fail: 7000 },
  supercharged: { lowWarn: 500, warn: 3000, fail: 7000 },
  nitrous: { lowWarn: 500, warn: 2500, fail: 6000 },
}

/**
 * Mean piston speed bounds at the pull's top rpm, ft/min. Heywood (1988, §2.2) puts production
 * engines' maximum at about 8–15 m/s (from memory); top racing engines reach about 25–33 m/s.
 * Warn above 5,000 ft/min (25.4 m/s) and fail above 7,000 ft/min (35.6 m/s): our own thresholds.
 */
export const PISTON_SPEED_BOUNDS_FT_MIN = { warn: 5000, fail: 7000 } as const

const RANK: Record<EvidenceOutcome, number> = { pass: 0, warn: 1, fail: 2 }
const worst = (outcomes: EvidenceOutcome[]): EvidenceOutcome =>
  outcomes.reduce<EvidenceOutcome>((w, o) => (RANK[o] > RANK[w] ? o : w), 'pass')

/** The worst outcome of a report. */
export function evidenceOutcome(checks: readonly EvidenceCheck[]): EvidenceOutcome {
  if (!Array.isArray(checks)) throw new RangeError('checks must be an array of evidence checks')
  checks.forEach((c, i) => {
    if (!c || typeof c !== 'object' || !Object.hasOwn(RANK, c.outcome)) throw new RangeError(`checks[${i}].outcome must be pass, warn or fail`)
  })
  return worst(checks.map(c => c.outcome))
}

const n0 = (x: number): string => Math.round(x).toString().replace(/\B(?=(\d{3})+(?!\d))/g, ',')
const n1 = (x: number): string => x.toFixed(1)
const pct = (x: number): string => `${(x * 100).toFixed(1)} %`
const label = (standard: string): string => CORRECTION_STANDARDS.find(s => s.id === standard)?.label ?? standard

/** Only finite numbers go into figures. */
function figures(values: Record<string, number | null | undefined>): Record<string, number> {
  const out: Record<string, number> = {}
  for (const [k, v] of Object.entries(values)) if (typeof v === 'number' && Number.isFinite(v)) out[k] = v
  return out
}

const check = (id: EvidenceCheckId, outcome: EvidenceOutcome, message: string, values: Record<string, number | null | undefined> = {}): EvidenceCheck =>
  ({ id, outcome, message, figures: figures(values) })

/** The largest value, by a loop: spreading 125,000+ values into Math.max overflows the call stack. */
function largestOf(values: readonly number[]): number {
  let top = -Infinity
  for (const v of values) if (v > top) top = v
  return top
}

/** Numeric sort in a typed array: much quicker than Array#sort with a comparator on 10,000+ values. */
const sortedCopy = (values: readonly number[]): Float64Array => Float64Array.from(values).sort()

function median(values: readonly number[]): number {
  if (values.length === 0) return Number.NaN
  const sorted = sortedCopy(values)
  const mid = sorted.length >> 1
  return sorted.length % 2 ? (sorted[mid] as number) : ((sorted[mid - 1] as number) + (sorted[mid] as number)) / 2
}

function quantile(values: readonly number[], q: number): number {
  if (values.length === 0) return Number.NaN
  const sorted = sortedCopy(values)
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))] as number
}

/** Points usable for figures: finite rpm and hp. */
function usable(points: unknown): PullPoint[] {
  if (!Array.isArray(points)) return []
  return points.filter((p): p is PullPoint => !!p && typeof p === 'object' && Number.isFinite(p.rpm) && Number.isFinite(p.hp))
}

function rpmOrder(points: PullPoint[]): EvidenceCheck {
  if (points.length < 2) return check('rpm-order', 'fail', 'The pull has fewer than two usable points.', { points: points.length })
  let backward = 0
  let firstBad = -1
  for (let i = 1; i < points.length; i++) {
    if ((points[i] as PullPoint).rpm <= (points[i - 1] as PullPoint).rpm) {
      backward++
      if (firstBad < 0) firstBad = i
    }
  }
  const first = points[0] as PullPoint
  const last = points[points.length - 1] as PullPoint
  const base = { points: points.length, fromRpm: first.rpm, toRpm: last.rpm, backwardSteps: backward }
  if (backward === 0) return check('rpm-order', 'pass', `rpm rises on every point, ${n0(first.rpm)} to ${n0(last.rpm)} rpm.`, base)
  const at = points[firstBad] as PullPoint
  const before = points[firstBad - 1] as PullPoint
  return check('rpm-order', 'fail', `rpm falls or repeats ${backward} ${backward === 1 ? 'time' : 'times'}, first at point ${firstBad + 1} (${n0(at.rpm)} after ${n0(before.rpm)} rpm). Ask the shop for the pull in rising rpm order.`, { ...base, firstBadPoint: firstBad + 1 })
}

function rpmSpacing(points: PullPoint[]): EvidenceCheck {
  const steps: number[] = []
  for (let i = 1; i < points.length; i++) steps.push((points[i] as PullPoint).rpm - (points[i - 1] as PullPoint).rpm)
  if (steps.length < 2) return check('rpm-spacing', 'fail', 'Too few points to judge the sampling.', { points: points.length })
  const step = median(steps)
  if (!(step > 0)) return check('rpm-spacing', 'fail', 'The rpm does not advance from point to point.', { medianStepRpm: step })
  const largest = largestOf(steps)
  const irregular = steps.filter(s => Math.abs(s - step) > 0.25 * step).length / steps.length
  const values = { medianStepRpm: step, largestGapRpm: largest, smallestStepRpm: -largestOf(steps.map(x => -x)), irregularShare: irregular }
  if (largest > 4 * step || step > 500) {
    return check('rpm-spacing', 'fail', `The sampling has a gap of ${n0(largest)} rpm against a usual step of ${n1(step)} rpm${step > 500 ? ' (steps over 500 rpm are too coarse to check peaks)' : ''}. Ask for the raw file with every sample.`, values)
  }
  if (step > 250 || largest > 2 * step || irregular > 0.1) {
    return check('rpm-spacing', 'warn', `Sampling is uneven or coarse: usual step ${n1(step)} rpm, largest gap ${n0(largest)} rpm, ${pct(irregular)} of steps more than 25 % off the usual. Figures between samples are interpolated.`, values)
  }
  return check('rpm-spacing', 'pass', `Evenly sampled every ${n1(step)} rpm or so (largest gap ${n0(largest)} rpm).`, values)
}

function powerTorque(pull: EvidencePull, points: PullPoint[]): EvidenceCheck {
  const cols = pull.columns
  if (cols && (!cols.torque || !cols.power)) {
    const given = cols.torque ? 'torque' : 'power'
    return check('power-torque-agreement', 'pass', `The file gives ${given} only, so the other was computed from it; nothing to compare.`, { comparedPoints: 0 })
  }
  const both = points.filter(p => p.lbFt !== undefined && Number.isFinite(p.lbFt) && p.rpm > 0)
  if (both.length === 0) return check('power-torque-agreement', 'pass', 'No point carries both torque and power; nothing to compare.', { comparedPoints: 0 })
  const peakHp = largestOf(both.map(p => p.hp))
  const floor = 0.02 * Math.abs(peakHp)
  const errors: number[] = []
  const ratios: number[] = []
  for (const p of both) {
    const expected = ((p.lbFt as number) * p.rpm) / HP_TORQUE_CROSSOVER_RPM
    errors.push(Math.abs(p.hp - expected) / Math.max(Math.abs(expected), floor, 1e-9))
    if (expected > floor) ratios.push(p.hp / expected)
  }
  const worstErr = largestOf(errors)
  const p95 = quantile(errors, 0.95)
  const ratio = median(ratios)
  const values = { comparedPoints: both.length, worstErrorPct: worstErr * 100, p95ErrorPct: p95 * 100, medianRatio: ratio }
  if (worstErr <= 0.01) return check('power-torque-agreement', 'pass', `Power agrees with torque × rpm / 5252 within ${pct(worstErr)} on all ${both.length} points.`, values)
  const where = disagreementRanges(both, errors)
  const hint = unitHint(ratios, ratio)
  if (p95 <= 0.01 || worstErr <= 0.02) {
    return check('power-torque-agreement', 'warn', `Power and torque × rpm / 5252 differ by up to ${pct(worstErr)} (95 % of points within ${pct(p95)}).${where}${hint}`, values)
  }
  return check('power-torque-agreement', 'fail', `Power does not follow torque × rpm / 5252: up to ${pct(worstErr)} apart, 95 % of points within ${pct(p95)}.${where}${hint || ' One of the columns was edited or mislabelled.'}`, values)
}

/** Points off by more than this share of the expected power count as disagreeing. */
const AGREE_WITHIN = 0.01

/**
 * Where power and torque disagree, in rpm ranges (at most three named), with the direction and the
 * worst point of each: "from 4,600 to 7,000 rpm the power is high, up to 9.0 % at 7,000 rpm".
 */
function disagreementRanges(points: readonly PullPoint[], errors: readonly number[]): string {
  const ranges: { from: number, to: number, worst: number, worstRpm: number, high: number, low: number }[] = []
  let open: (typeof ranges)[number] | null = null
  for (let i = 0; i < points.length; i++) {
    const p = points[i] as PullPoint
    const err = errors[i] as number
    if (err > AGREE_WITHIN) {
      if (!open) {
        open = { from: p.rpm, to: p.rpm, worst: 0, worstRpm: p.rpm, high: 0, low: 0 }
        ranges.push(open)
      }
      open.to = p.rpm
      if (err > open.worst) {
        open.worst = err
        open.worstRpm = p.rpm
      }
      if (p.hp > ((p.lbFt as number) * p.rpm) / HP_TORQUE_CROSSOVER_RPM) open.high++
      else open.low++
    }
    else {
      open = null
    }
  }
  if (ranges.length === 0) return ''
  const first = points[0] as PullPoint
  const last = points[points.length - 1] as PullPoint
  if (ranges.length === 1 && ranges[0]!.from === first.rpm && ranges[0]!.to === last.rpm) return ' They disagree across the whole pull.'
  const shown = [...ranges].sort((a, b) => b.worst - a.worst).slice(0, 3).sort((a, b) => a.from - b.from)
  const parts = shown.map((r) => {
    const side = r.high >= r.low ? 'high' : 'low'
    const span = r.from === r.to ? `at ${n0(r.from)} rpm` : `from ${n0(r.from)} to ${n0(r.to)} rpm`
    return `${span} the power is ${side}, up to ${pct(r.worst)} at ${n0(r.worstRpm)} rpm`
  })
  const more = ranges.length > shown.length ? ` (and ${ranges.length - shown.length} smaller stretch${ranges.length - shown.length === 1 ? '' : 'es'})` : ''
  return ` Where: ${parts.join('; ')}${more}; elsewhere they agree within ${pct(AGREE_WITHIN)}.`
}

/** Ratios this close together (10th to 90th percentile) count as one constant factor, such as a unit. */
const CONSTANT_SPREAD = 0.004

/**
 * A unit explanation, offered only when power is off torque × rpm / 5252 by one constant factor all
 * through the pull: kW or N·m under an imperial label (×0.7457), the reverse (×1.341), or metric
 * horsepower (PS) labelled hp (×1.0139, that is 745.7 W / 735.5 W; NIST SP 811). A disagreement that
 * grows with rpm is an edited column, not a unit, and gets no such hint.
 */
function unitHint(ratios: readonly number[], ratio: number): string {
  if (ratios.length < 3 || quantile(ratios, 0.9) - quantile(ratios, 0.1) > CONSTANT_SPREAD) return ''
  if (ratio > 0.72 && ratio < 0.76) return ' The power is a steady 0.74 of torque × rpm / 5252: one column looks metric (kW or N·m) under an imperial label.'
  if (ratio > 1.31 && ratio < 1.38) return ' The power is a steady 1.34 of torque × rpm / 5252: one column looks imperial under a metric label.'
  if (ratio > 1.008 && ratio < 1.02) return ' The power is a steady 1.4 % high all through the pull: it may be metric horsepower (PS) labelled hp.'
  return ''
}

type Grade = { outcome: EvidenceOutcome, note: string }

function gradeValue(name: string, declared: number, found: number, unit: string): Grade {
  const diff = (declared - found) / found
  const text = `${name} declared ${n1(declared)} ${unit}, file ${n1(found)} ${unit} (${diff >= 0 ? '+' : ''}${(diff * 100).toFixed(1)} %)`
  const a = Math.abs(diff)
  return { outcome: a <= 0.01 ? 'pass' : a <= 0.03 ? 'warn' : 'fail', note: text }
}

/** A declared peak rpm is fine where the curve there is within 0.5 % of the peak (flat tops make the exact rpm loose). */
function gradeRpm(name: string, points: PullPoint[], declaredRpm: number, fileRpm: number, peak: number, value: (p: PullPoint) => number): Grade {
  const first = (points[0] as PullPoint).rpm
  const last = (points[points.length - 1] as PullPoint).rpm
  if (declaredRpm < first || declaredRpm > last) {
    return { outcome: 'fail', note: `${name} rpm declared ${n0(declaredRpm)}, outside the pull (${n0(first)}–${n0(last)} rpm)` }
  }
  const there = valueAt(points, declaredRpm, value)
  const shortfall = (peak - there) / peak
  const outcome: EvidenceOutcome = shortfall <= 0.005 ? 'pass' : shortfall <= 0.02 ? 'warn' : 'fail'
  return { outcome, note: `${name} rpm declared ${n0(declaredRpm)}, file ${n0(fileRpm)} (the curve there is ${pct(shortfall)} under its peak)` }
}

function declaredPeaks(pull: EvidencePull, points: PullPoint[]): EvidenceCheck {
  if (points.length < 2) return check('declared-peaks', 'fail', 'Too few points to find peaks.')
  const found = peaks(points)
  const d = pull.declared ?? { standard: 'UNCORRECTED' }
  const grades: Grade[] = []
  const num = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x)
  if (num(d.peakHp)) grades.push(gradeValue('Peak power', d.peakHp, found.peakHp, 'hp'))
  if (num(d.peakTq)) grades.push(gradeValue('Peak torque', d.peakTq, found.peakTq, 'lb·ft'))
  if (num(d.peakHpRpm)) grades.push(gradeRpm('Peak power', points, d.peakHpRpm, found.peakHpRpm, found.peakHp, p => p.hp))
  if (num(d.peakTqRpm)) grades.push(gradeRpm('Peak torque', points, d.peakTqRpm, found.peakTqRpm, found.peakTq, torqueAt))
  const values = {
    filePeakHp: found.peakHp, filePeakHpRpm: found.peakHpRpm, filePeakTq: found.peakTq, filePeakTqRpm: found.peakTqRpm,
    declaredPeakHp: d.peakHp, declaredPeakHpRpm: d.peakHpRpm, declaredPeakTq: d.peakTq, declaredPeakTqRpm: d.peakTqRpm,
  }
  const fileText = `${n1(found.peakHp)} hp at ${n0(found.peakHpRpm)} rpm and ${n1(found.peakTq)} lb·ft at ${n0(found.peakTqRpm)} rpm`
  if (grades.length === 0) return check('declared-peaks', 'pass', `No peaks were declared; the file shows ${fileText}.`, values)
  const outcome = worst(grades.map(g => g.outcome))
  const off = grades.filter(g => g.outcome !== 'pass').map(g => g.note)
  if (outcome === 'pass') return check('declared-peaks', 'pass', `The declared peaks match the file (${fileText}).`, values)
  return check('declared-peaks', outcome, `${off.join('; ')}. Ask the shop to correct the build or send the file the figures came from.`, values)
}

function correction(pull: EvidencePull): EvidenceCheck {
  const standard = pull.declared?.standard
  const declared = pull.declared?.correctionFactor
  const hasDeclared = typeof declared === 'number' && Number.isFinite(declared)
  if (!isCorrectionStandard(standard)) return check('correction-factor', 'fail', `"${String(standard)}" is not a correction standard Torquewright knows.`)
  if (standard === 'UNCORRECTED') {
    if (hasDeclared && Math.abs(declared - 1) > 0.0005) {
      return check('correction-factor', 'fail', `The pull is declared uncorrected but carries a factor of ${declared.toFixed(3)}.`, { declaredFactor: declared })
    }
    return check('correction-factor', 'pass', 'Declared uncorrected (factor 1).', { declaredFactor: declared, computedFactor: 1 })
  }
  if (!pull.weather) {
    return check('correction-factor', 'warn', `No weather was given, so the ${label(standard)} factor cannot be checked; the curve is treated as uncorrected until the barometer, air temperature and humidity are added.`, { declaredFactor: declared })
  }
  let validity
  try {
    validity = correctionValidity(standard, pull.weather)
  }
  catch (error) {
    return check('correction-factor', 'fail', `The weather figures are impossible: ${error instanceof Error ? error.message : String(error)}.`, { declaredFactor: declared })
  }
  const computed = validity.factor
  const w = pull.weather
  const weatherText = `${w.baroInHg.toFixed(2)} inHg, ${n1(w.airTempF)} °F, ${n0(w.humidityPct)} % humidity`
  const values = {
    computedFactor: computed, declaredFactor: declared, difference: hasDeclared ? declared - computed : null,
    dryPressureKpa: validity.air.dryKpa, vapourPressureKpa: validity.air.vapourKpa, airTempC: validity.air.tempC,
  }
  const outcomes: EvidenceOutcome[] = []
  const notes: string[] = []
  if (hasDeclared) {
    const diff = Math.abs(declared - computed)
    outcomes.push(diff <= 0.005 ? 'pass' : diff <= 0.015 ? 'warn' : 'fail')
    notes.push(`Declared factor ${declared.toFixed(3)}; ${label(standard)} gives ${computed.toFixed(3)} for ${weatherText}.`)
    if (diff > 0.005) {
      const other = CORRECTION_STANDARDS.filter(s => s.id !== standard && s.id !== 'UNCORRECTED')
        .map(s => ({ s, f: correctionFactor(s.id, w) }))
        .filter(x => Math.abs(x.f - declared) <= 0.002)[0]
      if (other) notes.push(`The declared factor matches ${other.s.label} (${other.f.toFixed(3)}) instead.`)
    }
  }
  else {
    outcomes.push('pass')
    notes.push(`${label(standard)} gives ${computed.toFixed(3)} for ${weatherText} (no factor was declared to compare).`)
  }
  if (!validity.valid) {
    outcomes.push('warn')
    notes.push(`Outside what the standard allows: ${validity.reasons.join('; ')}.`)
  }
  return check('correction-factor', worst(outcomes), notes.join(' '), values)
}

function bmep(context: EvidenceContext, points: PullPoint[]): EvidenceCheck {
  const ci = context?.displacementCi
  if (!(typeof ci === 'number' && ci > 0 && Number.isFinite(ci))) return check('bmep', 'fail', 'The build has no displacement, so BMEP cannot be checked.')
  if (points.length === 0) return check('bmep', 'fail', 'No points to check.')
  const found = peaks(points)
  if (!Number.isFinite(found.peakTq)) return check('bmep', 'fail', 'No torque figure to check.')
  const aspiration: Aspiration = context.aspiration in BMEP_BOUNDS_KPA ? context.aspiration : 'na'
  const bounds = BMEP_BOUNDS_KPA[aspiration]
  const kpa = bmepKpaFromImperial(found.peakTq, ci)
  const psi = bmepPsi(found.peakTq, ci)
  const values = { bmepKpa: kpa, bmepPsi: psi, peakTq: found.peakTq, displacementCi: ci, warnKpa: bounds.warn, failKpa: bounds.fail, lowWarnKpa: bounds.lowWarn }
  const text = `BMEP at peak torque is ${n0(kpa)} kPa (${n0(psi)} psi) for ${n1(found.peakTq)} lb·ft from ${n1(ci)} ci`
  const kind = { na: 'naturally aspirated', turbo: 'turbocharged', supercharged: 'supercharged', nitrous: 'nitrous' }[aspiration]
  if (kpa > bounds.fail) return check('bmep', 'fail', `${text}, beyond any ${kind} engine we know of (over ${n0(bounds.fail)} kPa). Check the displacement, the aspiration and the torque column.`, values)
  if (kpa > bounds.warn) return check('bmep', 'warn', `${text}, a figure only top professional ${kind} engines reach (over ${n0(bounds.warn)} kPa). Worth a second look.`, values)
  if (kpa < bounds.lowWarn) return check('bmep', 'warn', `${text}, unusually low for a full-throttle pull (under ${n0(bounds.lowWarn)} kPa). Is it a chassis dyno, or is the displacement wrong?`, values)
  return check('bmep', 'pass', `${text}, plausible for a ${kind} engine.`, values)
}

function pistonSpeed(context: EvidenceContext, points: PullPoint[]): EvidenceCheck {
  const stroke = context?.strokeIn
  if (!(typeof stroke === 'number' && stroke > 0 && Number.isFinite(stroke))) return check('piston-speed', 'fail', 'The build has no stroke, so piston speed cannot be checked.')
  if (points.length === 0) return check('piston-speed', 'fail', 'No points to check.')
  const topRpm = largestOf(points.map(p => p.rpm))
  const ftMin = meanPistonSpeedFtMin(stroke, topRpm)
  const ms = (ftMin * 0.3048) / 60
  const values = { meanPistonSpeedFtMin: ftMin, meanPistonSpeedMs: ms, topRpm, strokeIn: stroke, warnFtMin: PISTON_SPEED_BOUNDS_FT_MIN.warn, failFtMin: PISTON_SPEED_BOUNDS_FT_MIN.fail }
  const text = `Mean piston speed at ${n0(topRpm)} rpm with a ${stroke.toFixed(3)} in stroke is ${n0(ftMin)} ft/min (${n1(ms)} m/s)`
  if (ftMin > PISTON_SPEED_BOUNDS_FT_MIN.fail) return check('piston-speed', 'fail', `${text}, beyond any piston engine we know of. Check the stroke and the rpm column.`, values)
  if (ftMin > PISTON_SPEED_BOUNDS_FT_MIN.warn) return check('piston-speed', 'warn', `${text}, a speed only top professional race engines run. Worth a second look.`, values)
  return check('piston-speed', 'pass', `${text}, plausible.`, values)
}

function duplicate(context: EvidenceContext, points: PullPoint[]): EvidenceCheck {
  const others = (context?.fingerprintsOfOtherBuilds ?? []).filter(o => context.buildId === undefined || context.buildId === null || String(o.buildId) !== String(context.buildId))
  if (others.length === 0) return check('duplicate-curve', 'pass', 'No other builds\' curves to compare against.', { comparedCurves: 0 })
  const mine = curveFingerprint(points)
  const scored = others.map(o => ({ buildId: o.buildId, distance: fingerprintDistance(mine, o.fingerprint) }))
  const matches = scored.filter(s => s.distance <= FINGERPRINT_TOLERANCE)
  const close = scored.filter(s => s.distance > FINGERPRINT_TOLERANCE && s.distance <= 2 * FINGERPRINT_TOLERANCE)
  const nearest = scored.reduce((a, b) => (b.distance < a.distance ? b : a))
  const closest = nearest.distance
  // The admin's report links to the build behind a match or a near match; figures are numbers, so only a numeric id is carried.
  const nearestId = Number(nearest.buildId)
  const linkable = closest <= 2 * FINGERPRINT_TOLERANCE && Number.isSafeInteger(nearestId) && nearestId > 0
  const values = { comparedCurves: others.length, matches: matches.length, closestDistance: closest, tolerance: FINGERPRINT_TOLERANCE, closestBuildId: linkable ? nearestId : null }
  // Counted, never listed by id: the shop reads this report too, and the admin's review links the builds themselves.
  const builds = (n: number) => (n === 1 ? 'another build' : `${n} other builds`)
  if (matches.length > 0) return check('duplicate-curve', 'fail', `The same curve is already attached to ${builds(matches.length)} (allowing for resampling and correction). Ask the shop which build it belongs to.`, values)
  if (close.length > 0) return check('duplicate-curve', 'warn', `The curve is very close in shape to ${builds(close.length)}; compare the pulls side by side.`, values)
  return check('duplicate-curve', 'pass', `Unlike the ${others.length} other ${others.length === 1 ? 'curve' : 'curves'} on file.`, values)
}

/** Runs every check on a pull; never throws (a check that cannot run fails with the reason). */
export function checkEvidence(pull: EvidencePull, context: EvidenceContext): EvidenceCheck[] {
  const points = usable(pull?.points)
  const safe = (id: EvidenceCheckId, run: () => EvidenceCheck): EvidenceCheck => {
    try {
      return run()
    }
    catch (error) {
      return check(id, 'fail', `This check could not run: ${error instanceof Error ? error.message : String(error)}.`)
    }
  }
  const ordered = points.length >= 2 && points.every((p, i) => i === 0 || p.rpm > (points[i - 1] as PullPoint).rpm)
  return [
    safe('rpm-order', () => rpmOrder(points)),
    safe('rpm-spacing', () => rpmSpacing(points)),
    safe('power-torque-agreement', () => powerTorque(pull, points)),
    safe('declared-peaks', () => declaredPeaks(pull, points)),
    safe('correction-factor', () => correction(pull)),
    safe('bmep', () => bmep(context, points)),
    safe('piston-speed', () => pistonSpeed(context, points)),
    safe('duplicate-curve', () => ordered
      ? duplicate(context, points)
      : check('duplicate-curve', 'warn', 'The rpm is out of order, so the curve could not be fingerprinted.')),
  ]
}
