import type { EditorFields } from '#shared/types/editor'
import { ASPIRATION_LABELS, FUEL_LABELS, USE_LABELS } from './format'

/** How the build editor shows each field: label, input kind, unit and hint, grouped as the shop thinks of them. */
export interface EditorFieldSpec {
  key: keyof EditorFields
  label: string
  kind: 'text' | 'textarea' | 'number' | 'integer' | 'money' | 'select'
  unit?: string
  step?: string
  hint?: string
  options?: Record<string, string>
  /** Wider fields take the whole row. */
  wide?: boolean
}

/** A parts-list row as typed in the editor (numbers stay text until they read). */
export interface PartRowText {
  key: number
  category: string
  part: string
  partNumber: string
  quantity: string
  price: string
}

export interface EditorFieldGroup {
  title: string
  fields: EditorFieldSpec[]
}

export const EDITOR_GROUPS: EditorFieldGroup[] = [
  {
    title: 'The build',
    fields: [
      { key: 'title', label: 'Title', kind: 'text', wide: true },
      { key: 'summary', label: 'Summary', kind: 'textarea', wide: true, hint: 'What the build is for and what makes it work, in a few sentences.' },
      { key: 'intendedUse', label: 'Intended use', kind: 'select', options: USE_LABELS },
      { key: 'priceCents', label: 'As-built price', kind: 'money', unit: 'USD' },
    ],
  },
  {
    title: 'Short block',
    fields: [
      { key: 'engineFamily', label: 'Engine family', kind: 'text' },
      { key: 'cylinders', label: 'Cylinders', kind: 'integer' },
      { key: 'boreIn', label: 'Bore', kind: 'number', unit: 'in', step: '0.001' },
      { key: 'strokeIn', label: 'Stroke', kind: 'number', unit: 'in', step: '0.001' },
      { key: 'rodLengthIn', label: 'Rod length', kind: 'number', unit: 'in', step: '0.001' },
      { key: 'deckClearanceIn', label: 'Deck clearance', kind: 'number', unit: 'in', step: '0.001', hint: 'Piston below the deck at TDC is positive.' },
      { key: 'pistonCc', label: 'Piston dome/dish', kind: 'number', unit: 'cc', step: '0.1', hint: 'Dish and valve reliefs positive, a dome negative.' },
    ],
  },
  {
    title: 'Heads and gasket',
    fields: [
      { key: 'cylinderHeads', label: 'Cylinder heads', kind: 'text', wide: true },
      { key: 'chamberCc', label: 'Chamber volume', kind: 'number', unit: 'cc', step: '0.1' },
      { key: 'gasketBoreIn', label: 'Gasket bore', kind: 'number', unit: 'in', step: '0.001' },
      { key: 'gasketThicknessIn', label: 'Gasket compressed thickness', kind: 'number', unit: 'in', step: '0.001' },
    ],
  },
  {
    title: 'Camshaft',
    fields: [
      { key: 'camIntakeDurationDeg', label: 'Intake duration at 0.050 in', kind: 'number', unit: '°', step: '0.5' },
      { key: 'camExhaustDurationDeg', label: 'Exhaust duration at 0.050 in', kind: 'number', unit: '°', step: '0.5' },
      { key: 'camIntakeLiftIn', label: 'Intake lift', kind: 'number', unit: 'in', step: '0.001' },
      { key: 'camExhaustLiftIn', label: 'Exhaust lift', kind: 'number', unit: 'in', step: '0.001' },
      { key: 'camLobeSeparationDeg', label: 'Lobe separation', kind: 'number', unit: '°', step: '0.5' },
      { key: 'camIntakeCenterlineDeg', label: 'Installed intake centreline', kind: 'number', unit: '° ATDC', step: '0.5' },
    ],
  },
  {
    title: 'Induction, fuel and management',
    fields: [
      { key: 'aspiration', label: 'Aspiration', kind: 'select', options: ASPIRATION_LABELS },
      { key: 'fuel', label: 'Fuel', kind: 'select', options: FUEL_LABELS },
      { key: 'intakeManifold', label: 'Intake manifold', kind: 'text' },
      { key: 'throttleBody', label: 'Throttle body or carburettor', kind: 'text' },
      { key: 'injectorSizeLbHr', label: 'Injector size', kind: 'number', unit: 'lb/hr', step: '0.1', hint: 'Leave both injector fields empty for a carburetted build.' },
      { key: 'injectorCount', label: 'Injector count', kind: 'integer' },
      { key: 'engineManagement', label: 'Engine-management platform', kind: 'text', wide: true },
    ],
  },
]

/** Dollars typed by a person ("14,500" or "14500.50") to integer cents; null when empty, NaN when unreadable. */
export function dollarsToCents(text: string): number | null {
  const clean = text.replace(/[$,\s]/g, '')
  if (clean === '') return null
  if (!/^\d+(\.\d{0,2})?$/.test(clean)) return Number.NaN
  const [whole, frac = ''] = clean.split('.')
  return Number(whole) * 100 + Number((frac + '00').slice(0, 2))
}

/** Cents shown in an input box: 1450000 → "14500.00"; whole dollars without decimals. */
export function centsToInput(cents: number | null | undefined): string {
  if (cents === null || cents === undefined) return ''
  return cents % 100 === 0 ? String(cents / 100) : (cents / 100).toFixed(2)
}
