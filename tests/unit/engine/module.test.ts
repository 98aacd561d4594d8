import { readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { describe, expect, it } from 'vitest'
import * as engine from '../../../shared/engine'

const dir = fileURLToPath(new URL('../../../shared/engine/', import.meta.url))

describe('the engine module\'s public face and purity', () => {
  it('exports the functions the issue names', () => {
    const names = [
      'displacementCi', 'ciToLitres', 'litresToCi', 'staticCompressionRatio', 'dynamicCompressionRatio', 'meanPistonSpeedFtMin',
      'rodStrokeRatio', 'camEvents', 'hpFromTorque', 'torqueFromHp', 'kwFromNm', 'hpToKw', 'kwToHp', 'lbFtToNm', 'nmToLbFt',
      'bmepPsi', 'bmepKpa', 'correctionFactor', 'correctionValidity', 'convertCurve', 'resample', 'peaks', 'averagePower',
      'powerBandRpm', 'deltaCurve', 'describeDelta', 'injectorSizeLbHr', 'lbHrToCcMin', 'airflowCfm', 'parsePull',
      'checkEvidence', 'curveFingerprint', 'fingerprintDistance', 'sameCurve',
    ]
    for (const name of names) expect(typeof (engine as Record<string, unknown>)[name], name).toBe('function')
    expect(Object.keys(engine.fuelDefaults).sort()).toEqual(['e85', 'methanol', 'pump_gas', 'race_gas'])
    expect(engine.CORRECTION_STANDARDS.map(s => s.id)).toEqual(
      expect.arrayContaining(['UNCORRECTED', 'SAE_J1349_1990', 'SAE_J1349_2004', 'SAE_J607', 'DIN_70020', 'ISO_1585']),
    )
  })

  it('imports only relative files (no extension) and papaparse: no Nuxt aliases, no Node built-ins, no I/O', () => {
    const files = readdirSync(dir).filter(f => f.endsWith('.ts'))
    expect(files.length).toBeGreaterThan(8)
    for (const file of files) {
      const source = readFileSync(join(dir, file), 'utf8')
      const specifiers = [...source.matchAll(/\b(?:from|import)\s*\(?\s*['"]([^'"]+)['"]/g)].map(m => m[1]!)
      for (const s of specifiers) {
        const relative = /^\.\/[\w-]+$/.test(s)
        expect(relative || s === 'papaparse', `${file} imports "${s}"`).toBe(true)
      }
      expect(source, file).not.toMatch(/\b(?:fetch|require|process\.|useState|useFetch|defineNuxt|\$fetch)\b/)
    }
  })
})
