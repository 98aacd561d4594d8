import { describe, expect, it } from 'vitest'
import { DISPLAY_MAX_POINTS, displayCurve, displayStepRpm } from '../../shared/builds/display-curve'
import type { PullPoint } from '../../shared/engine'

function pull(from: number, to: number, step: number): PullPoint[] {
  const out: PullPoint[] = []
  for (let rpm = from; rpm <= to; rpm += step) out.push({ rpm, hp: (400 * rpm) / 5252, lbFt: 400 })
  return out
}

describe('displayCurve', () => {
  it('leaves a pull of ordinary density as it is', () => {
    const p = pull(2500, 7000, 100)
    expect(displayCurve(p)).toEqual(p)
  })

  it('thins a dense pull to at most the display bound on a round grid inside the pull', () => {
    const p = pull(2000, 8000, 1)
    const d = displayCurve(p)
    expect(d.length).toBeLessThanOrEqual(DISPLAY_MAX_POINTS)
    expect(d[0]!.rpm).toBeGreaterThanOrEqual(2000)
    expect(d.at(-1)!.rpm).toBeLessThanOrEqual(8000)
    for (const point of d) expect(point.rpm % 10).toBe(0)
    // A flat 400 lb·ft curve stays 400 lb·ft, and hp = lb·ft × rpm / 5252 (33,000 ft·lbf/min per hp ÷ 2π, NIST SP 811).
    for (const point of d) {
      expect(point.lbFt).toBeCloseTo(400, 6)
      expect(point.hp).toBeCloseTo((400 * point.rpm) / 5252, 0)
    }
  })

  it('picks the smallest whole-ten step that fits the bound', () => {
    expect(displayStepRpm(6000)).toBe(20)
    expect(displayStepRpm(100)).toBe(10)
    expect(Math.floor(6000 / displayStepRpm(6000)) + 1).toBeLessThanOrEqual(DISPLAY_MAX_POINTS)
    expect(Math.floor(6000 / (displayStepRpm(6000) - 10)) + 1).toBeGreaterThan(DISPLAY_MAX_POINTS)
  })
})
