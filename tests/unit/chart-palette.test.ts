import { describe, expect, it } from 'vitest'
import tailwind from '../../tailwind.config'
import { GAIN, LOSS, PULL_HUES, SERIES, seriesColour } from '../../utils/chart-palette'

/** Hex to HSL (hue in degrees), the standard RGB→HSL conversion (CSS Color Module Level 4, §7). */
function hsl(hex: string): { h: number, s: number, l: number } {
  const [r, g, b] = [1, 3, 5].map(i => Number.parseInt(hex.slice(i, i + 2), 16) / 255) as [number, number, number]
  const max = Math.max(r, g, b)
  const min = Math.min(r, g, b)
  const l = (max + min) / 2
  const d = max - min
  if (d === 0) return { h: 0, s: 0, l: l * 100 }
  const s = d / (1 - Math.abs(2 * l - 1))
  const h = max === r ? ((g - b) / d) % 6 : max === g ? (b - r) / d + 2 : (r - g) / d + 4
  return { h: (h * 60 + 360) % 360, s: s * 100, l: l * 100 }
}

/** WCAG 2.2 relative luminance and contrast ratio (Understanding SC 1.4.3, "relative luminance"). */
function contrastOnWhite(hex: string): number {
  const lin = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4)
  const [r, g, b] = [1, 3, 5].map(i => lin(Number.parseInt(hex.slice(i, i + 2), 16) / 255)) as [number, number, number]
  const y = 0.2126 * r + 0.7152 * g + 0.0722 * b
  return 1.05 / (y + 0.05)
}

const hueGap = (a: number, b: number) => Math.min(Math.abs(a - b), 360 - Math.abs(a - b))

describe('the chart palette', () => {
  it('gives each pull one hue: power and torque of pull N derive from the same hue, torque lighter', () => {
    expect(SERIES.length).toBe(PULL_HUES.length)
    for (const [i, pair] of SERIES.entries()) {
      const power = hsl(pair.power)
      const torque = hsl(pair.torque)
      // Rounding each channel to 8 bits moves the hue by at most a degree or two.
      expect(hueGap(power.h, PULL_HUES[i]!.h)).toBeLessThan(2)
      expect(hueGap(torque.h, PULL_HUES[i]!.h)).toBeLessThan(2)
      expect(torque.l).toBeGreaterThan(power.l + 5)
    }
  })

  it('keeps different pulls apart by hue', () => {
    for (let i = 0; i < SERIES.length; i++) {
      for (let j = i + 1; j < SERIES.length; j++) expect(hueGap(hsl(SERIES[i]!.power).h, hsl(SERIES[j]!.power).h)).toBeGreaterThanOrEqual(20)
    }
  })

  it('draws every line and bar at 3:1 or more against white (WCAG 2.2 SC 1.4.11, non-text contrast)', () => {
    for (const colour of [...SERIES.flatMap(p => [p.power, p.torque]), GAIN, LOSS]) expect(contrastOnWhite(colour)).toBeGreaterThanOrEqual(3)
  })

  it('repeats the four hues for a fifth pull', () => {
    expect(seriesColour(4)).toEqual(seriesColour(0))
    expect(seriesColour(1).power).not.toBe(seriesColour(0).power)
  })

  it('styles gain and loss bars in the house tokens, spruce and copper, not a plain green/red pair', () => {
    const colours = tailwind.theme.extend.colors
    expect(GAIN).toBe(colours.spruce.DEFAULT)
    expect(LOSS).toBe(colours.copper.DEFAULT)
  })
})
