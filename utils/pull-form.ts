import { pullMetaSchema, type PullMeta } from '#shared/schemas/build'

/** The pull form as typed: every box is text until it is sent. */
export interface PullFormText {
  label: string
  dynoKind: 'engine' | 'chassis'
  declaredStandard: string
  declaredFactor: string
  baroInHg: string
  airTempF: string
  humidityPct: string
  declaredPeakHp: string
  declaredPeakHpRpm: string
  declaredPeakTq: string
  declaredPeakTqRpm: string
  comparisonRole: '' | 'baseline' | 'variant'
  changeKind: string
  changeNote: string
}

export const emptyPullForm = (): PullFormText => ({
  label: '', dynoKind: 'engine', declaredStandard: 'SAE_J1349_2004', declaredFactor: '', baroInHg: '', airTempF: '', humidityPct: '',
  declaredPeakHp: '', declaredPeakHpRpm: '', declaredPeakTq: '', declaredPeakTqRpm: '', comparisonRole: '', changeKind: '', changeNote: '',
})

const num = (t: string) => (t.trim() === '' ? null : Number(t.trim().replace(/,/g, '')))

/**
 * The typed form as the metadata the server takes, checked with the same schema; the weather is
 * all three readings or none (a partial set says which box is missing).
 */
export function pullMetaFrom(form: PullFormText): { ok: true, meta: PullMeta } | { ok: false, message: string } {
  const weatherBoxes = [form.baroInHg, form.airTempF, form.humidityPct].filter(t => t.trim() !== '').length
  if (weatherBoxes > 0 && weatherBoxes < 3) return { ok: false, message: 'Give the barometer, air temperature and humidity together, or leave all three empty (the pull is then shown uncorrected).' }
  const result = pullMetaSchema.safeParse({
    label: form.label,
    dynoKind: form.dynoKind,
    declaredStandard: form.declaredStandard,
    declaredFactor: num(form.declaredFactor),
    weather: weatherBoxes === 3 ? { baroInHg: num(form.baroInHg), airTempF: num(form.airTempF), humidityPct: num(form.humidityPct) } : null,
    declaredPeakHp: num(form.declaredPeakHp),
    declaredPeakHpRpm: num(form.declaredPeakHpRpm),
    declaredPeakTq: num(form.declaredPeakTq),
    declaredPeakTqRpm: num(form.declaredPeakTqRpm),
    comparisonRole: form.comparisonRole || null,
    changeKind: form.comparisonRole === 'variant' ? (form.changeKind || null) : null,
    changeNote: form.comparisonRole === 'variant' && form.changeNote.trim() ? form.changeNote : null,
  })
  if (!result.success) return { ok: false, message: result.error.issues.map(i => i.message).join('; ') }
  return { ok: true, meta: result.data }
}

export const CHANGE_LABELS: Record<string, string> = {
  heads: 'Cylinder heads', intake: 'Intake', camshaft: 'Camshaft', exhaust: 'Exhaust', tune: 'Tune', other: 'Something else',
}
