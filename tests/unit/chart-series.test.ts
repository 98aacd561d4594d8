import { describe, expect, it } from 'vitest'
import { rpmSeries } from '../../utils/chart-series'

describe('a curve as a chart line', () => {
  it('puts each point\'s rpm across and the chosen figure up, in the curve\'s order', () => {
    const curve = [{ rpm: 3000, power: 210.5, torque: 368.5 }, { rpm: 3500, power: 262, torque: 393.1 }]
    expect(rpmSeries(curve, p => p.power)).toEqual([{ x: 3000, y: 210.5 }, { x: 3500, y: 262 }])
    expect(rpmSeries(curve, p => p.torque)).toEqual([{ x: 3000, y: 368.5 }, { x: 3500, y: 393.1 }])
  })

  it('draws nothing for an empty curve', () => {
    expect(rpmSeries([], () => 1)).toEqual([])
  })
})
