/** Camshaft valve events from duration, lobe separation and installed intake centreline (cam card arithmetic). */
import { record, within } from './guard'

export interface CamSpec {
  /** Intake duration in crank degrees, at one lift for both lobes (0.050 in or seat): the events come out on the same basis. */
  intakeDurationDeg: number
  exhaustDurationDeg: number
  /** Lobe separation angle: cam degrees between the intake and exhaust lobe centrelines. */
  lobeSeparationDeg: number
  /** Installed intake centreline, crank degrees after TDC. */
  intakeCenterlineDeg: number
}

export interface CamEvents {
  /** Degrees both valves are open around TDC (negative when one closes before the other opens). */
  overlapDeg: number
  intakeOpensBtdcDeg: number
  intakeClosesAbdcDeg: number
  exhaustOpensBbdcDeg: number
  exhaustClosesAtdcDeg: number
  /** Exhaust centreline, crank degrees before TDC. */
  exhaustCenterlineDeg: number
  /** Installed advance: lobe separation minus intake centreline. */
  advanceDeg: number
}

/**
 * Valve events from the standard relations (cam card arithmetic, common practice):
 * IVO = dur/2 − ICL, IVC = dur/2 + ICL − 180, ECL = 2·LSA − ICL, EVO = dur/2 + ECL − 180,
 * EVC = dur/2 − ECL, overlap = IVO + EVC.
 */
export function camEvents(spec: CamSpec): CamEvents {
  record('spec', spec, 'intakeDurationDeg, exhaustDurationDeg, lobeSeparationDeg and intakeCenterlineDeg')
  const intDur = within('intakeDurationDeg', spec.intakeDurationDeg, 1, 359, '°')
  const exhDur = within('exhaustDurationDeg', spec.exhaustDurationDeg, 1, 359, '°')
  const lsa = within('lobeSeparationDeg', spec.lobeSeparationDeg, 80, 140, '°')
  const icl = within('intakeCenterlineDeg', spec.intakeCenterlineDeg, 60, 160, '°')
  const ecl = 2 * lsa - icl
  const intakeOpensBtdcDeg = intDur / 2 - icl
  const intakeClosesAbdcDeg = intDur / 2 + icl - 180
  const exhaustOpensBbdcDeg = exhDur / 2 + ecl - 180
  const exhaustClosesAtdcDeg = exhDur / 2 - ecl
  return {
    overlapDeg: intakeOpensBtdcDeg + exhaustClosesAtdcDeg,
    intakeOpensBtdcDeg,
    intakeClosesAbdcDeg,
    exhaustOpensBbdcDeg,
    exhaustClosesAtdcDeg,
    exhaustCenterlineDeg: ecl,
    advanceDeg: lsa - icl,
  }
}
