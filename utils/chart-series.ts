/** One line of a Chart.js line chart over engine speed: each point's rpm across, `y(point)` up. */
export function rpmSeries<P extends { rpm: number }>(points: readonly P[], y: (point: P) => number): { x: number, y: number }[] {
  return points.map(p => ({ x: p.rpm, y: y(p) }))
}
