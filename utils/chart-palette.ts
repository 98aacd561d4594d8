/**
 * Chart colours from the house tokens. Each pull has one hue: its power line in the full colour and
 * its torque line a lighter tint of the same hue (and dashed), so one swatch names both lines.
 * Every colour stays at 3:1 or more against white (WCAG 2.2 SC 1.4.11, non-text contrast).
 */
export interface Hsl { h: number, s: number, l: number }

/** The pull hues: copper, spruce, plum, amber (tailwind.config.ts; plum is the charts' own fourth). */
export const PULL_HUES: readonly Hsl[] = [
  { h: 18, s: 68, l: 37 },
  { h: 167, s: 39, l: 30 },
  { h: 265, s: 32, l: 44 },
  { h: 41, s: 79, l: 29 },
]
/** How much lighter the torque tint is than the power colour, in HSL lightness points. */
export const TORQUE_LIGHTER = 12

export function hslToHex({ h, s, l }: Hsl): string {
  const sat = s / 100
  const light = l / 100
  const k = (n: number) => (n + h / 30) % 12
  const a = sat * Math.min(light, 1 - light)
  const f = (n: number) => light - a * Math.max(-1, Math.min(k(n) - 3, Math.min(9 - k(n), 1)))
  return `#${[f(0), f(8), f(4)].map(x => Math.round(x * 255).toString(16).padStart(2, '0')).join('')}`
}

/** One pair per pull: power in the hue's colour, torque in a lighter tint of it. */
export const SERIES = PULL_HUES.map(hue => ({
  hue: hue.h,
  power: hslToHex(hue),
  torque: hslToHex({ ...hue, l: hue.l + TORQUE_LIGHTER }),
}))

/** The colours of pull `i` (the palette repeats after four). */
export const seriesColour = (i: number) => SERIES[i % SERIES.length]!

/** Gain and loss bars in the house colours (tailwind.config.ts): spruce for a gain, copper for a loss. */
export const GAIN = '#2f6b5e'
export const LOSS = '#a0461f'
