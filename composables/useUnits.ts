import { toDisplay, unitLabel, type FigureKind } from '#shared/units/display'

/** Formats stored (imperial) figures in the viewer's chosen units: `figure('power', 512.3)` → "382" with unit "kW". */
export function useUnits() {
  const store = useUnitsStore()
  const system = computed(() => store.system)

  function figure(kind: FigureKind, value: number | null | undefined, digits = 0): { text: string, unit: string } {
    if (value === null || value === undefined || Number.isNaN(value)) return { text: '—', unit: unitLabel(kind, store.system) }
    const shown = toDisplay(kind, value, store.system, digits)
    return { text: formatNumber(shown.value, shown.digits), unit: shown.unit }
  }

  /** The figure and its unit as one string: "382 kW". */
  function format(kind: FigureKind, value: number | null | undefined, digits = 0): string {
    const f = figure(kind, value, digits)
    return `${f.text} ${f.unit}`
  }

  /** The number alone in the viewer's units (for charts): `value('torque', 400)` → 542.3 when metric. */
  function value(kind: FigureKind, imperial: number): number {
    return toDisplay(kind, imperial, store.system).value
  }

  /** The unit label alone in the viewer's units. */
  function unit(kind: FigureKind): string {
    return unitLabel(kind, store.system)
  }

  return { system, figure, format, value, unit }
}
