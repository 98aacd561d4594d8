/** Series colours for the curve charts, from the design tokens: one pair (power, torque) per pull. */
export const SERIES = [
  { power: '#b8562a', torque: '#1d2230' },
  { power: '#2f6b5e', torque: '#5d8f84' },
  { power: '#b7861f', torque: '#8a6a1f' },
  { power: '#6a4c93', torque: '#8d78ad' },
] as const

export const GAIN = '#2f6b5e'
export const LOSS = '#c0392b'
