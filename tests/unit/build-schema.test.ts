import { describe, expect, it } from 'vitest'
import { staticCompressionRatio } from '../../shared/engine'
import { buildPatch, buildPublishSchema, lineTotalCents, partsTotalCents, pullMetaSchema, REQUIRED_FOR_PUBLISH } from '../../shared/schemas/build'

// An invented, plausible small-block combination (values from memory of common practice).
const complete = {
  title: 'Street 383',
  summary: 'Pump-gas small block for the street, broken in and tuned on the engine dyno.',
  engineFamily: 'Pushrod V8, small block',
  cylinders: 8,
  boreIn: 4.03,
  strokeIn: 3.75,
  rodLengthIn: 6,
  cylinderHeads: 'Aluminium 23° heads',
  chamberCc: 64,
  pistonCc: 5,
  gasketBoreIn: 4.1,
  gasketThicknessIn: 0.04,
  deckClearanceIn: 0.005,
  camIntakeDurationDeg: 236,
  camExhaustDurationDeg: 244,
  camIntakeLiftIn: 0.6,
  camExhaustLiftIn: 0.6,
  camLobeSeparationDeg: 110,
  camIntakeCenterlineDeg: 106,
  intakeManifold: 'Single-plane',
  throttleBody: '1000 cfm four-barrel',
  injectorSizeLbHr: null,
  injectorCount: null,
  fuel: 'pump_gas',
  aspiration: 'na',
  engineManagement: 'Carburettor',
  intendedUse: 'street',
  priceCents: 1_450_000,
}

const paths = (r: { success: boolean, error?: { issues: { path: PropertyKey[] }[] } }) => (r.error?.issues ?? []).map(i => i.path.join('.'))

describe('the publish schema', () => {
  it('accepts a complete, plausible combination', () => {
    expect(buildPublishSchema.safeParse(complete).success).toBe(true)
  })

  it('names every missing required field', () => {
    const r = buildPublishSchema.safeParse({ title: 'Only a title' })
    expect(new Set(paths(r))).toEqual(new Set(REQUIRED_FOR_PUBLISH.concat(['injectorSizeLbHr', 'injectorCount'] as never[])))
  })

  it('catches a slipped decimal point in a dimension', () => {
    expect(paths(buildPublishSchema.safeParse({ ...complete, boreIn: 40.3 }))).toEqual(['boreIn'])
  })

  it('wants injector size and count together, or neither', () => {
    expect(paths(buildPublishSchema.safeParse({ ...complete, injectorSizeLbHr: 60, injectorCount: null }))).toEqual(['injectorCount'])
    expect(buildPublishSchema.safeParse({ ...complete, injectorSizeLbHr: 60, injectorCount: 8 }).success).toBe(true)
  })

  it('refuses a static compression outside 5–20:1 (computed by the engine module)', () => {
    const tight = { ...complete, chamberCc: 20, pistonCc: -20 }
    expect(staticCompressionRatio(tight)).toBeGreaterThan(20)
    expect(paths(buildPublishSchema.safeParse(tight))).toEqual(['chamberCc'])
  })
})

describe('the autosave patch', () => {
  it('takes any subset, with null clearing a field, and refuses unknown keys', () => {
    expect(buildPatch.safeParse({ boreIn: 4.03, strokeIn: null }).success).toBe(true)
    expect(buildPatch.safeParse({ displacementCi: 383 }).success).toBe(false)
  })

  it('checks each field it is given on its own', () => {
    expect(paths(buildPatch.safeParse({ cylinders: 8.5 }))).toEqual(['cylinders'])
  })

  it('checks parts rows: whole quantities and whole cents', () => {
    expect(paths(buildPatch.safeParse({ parts: [{ category: 'Heads', part: 'Ported heads', quantity: 1.5, unitPriceCents: 100 }] }))).toEqual(['parts.0.quantity'])
    expect(paths(buildPatch.safeParse({ parts: [{ category: 'Heads', part: 'Ported heads', quantity: 1, unitPriceCents: 99.5 }] }))).toEqual(['parts.0.unitPriceCents'])
  })
})

describe('parts totals', () => {
  it('adds line totals in integer cents', () => {
    const rows = [{ quantity: 8, unitPriceCents: 12_475 }, { quantity: 16, unitPriceCents: 2_999 }, { quantity: 1, unitPriceCents: 1 }]
    expect(lineTotalCents(rows[0]!)).toBe(99_800)
    expect(partsTotalCents(rows)).toBe(99_800 + 47_984 + 1)
    expect(partsTotalCents([])).toBe(0)
  })
})

describe('pull metadata', () => {
  const base = { label: 'Pull 1', dynoKind: 'engine', declaredStandard: 'SAE_J1349_2004' }
  it('fills the optional figures with null', () => {
    const r = pullMetaSchema.parse(base)
    expect(r.weather).toBeNull()
    expect(r.comparisonRole).toBeNull()
  })

  it('wants what changed on a variant, and only on a variant', () => {
    expect(paths(pullMetaSchema.safeParse({ ...base, comparisonRole: 'variant' }))).toEqual(['changeKind'])
    expect(paths(pullMetaSchema.safeParse({ ...base, changeKind: 'heads' }))).toEqual(['changeKind'])
    expect(pullMetaSchema.safeParse({ ...base, comparisonRole: 'variant', changeKind: 'heads' }).success).toBe(true)
  })

  it('takes the weather as all three readings or none', () => {
    expect(paths(pullMetaSchema.safeParse({ ...base, weather: { baroInHg: 29.9, airTempF: 70 } }))).toEqual(['weather.humidityPct'])
    expect(paths(pullMetaSchema.safeParse({ ...base, declaredStandard: 'SAE_J9999' }))).toEqual(['declaredStandard'])
  })
})

describe('messages a shop reads in the editor', () => {
  it('name a choice in words, never the stored codes', () => {
    const r = buildPublishSchema.safeParse({ ...complete, fuel: 'kerosene', aspiration: undefined, intendedUse: 'x' })
    expect(r.success).toBe(false)
    const messages = (r.error?.issues ?? []).map(i => i.message)
    expect(messages).toContain('Pick the fuel from the list')
    expect(messages).toContain('Pick the aspiration from the list')
    expect(messages).toContain('Pick the intended use from the list')
    for (const m of messages) expect(m).not.toMatch(/pump_gas|race_gas|road_course|street_strip|_/)
  })
})
