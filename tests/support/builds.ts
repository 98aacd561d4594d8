import { readdirSync, statSync } from 'node:fs'
import { join, relative, resolve } from 'node:path'
import { eq, inArray } from 'drizzle-orm'
import type { MySql2Database } from 'drizzle-orm/mysql2'
import { createStorage } from 'unstorage'
import fsDriver from 'unstorage/drivers/fs'
import { loadConfig } from '../../scripts/lib/config'
import { makeCurve, pullCsv } from '../../scripts/lib/demo-data'
import { seededRandom } from '../../shared/random'
import * as schema from '../../server/database/schema'
import type { Database } from '../../server/database/types'
import { deleteBuild } from '../../server/services/build-editor'
import type { UploadStore } from '../../server/utils/files'
import type { PullMeta } from '../../shared/schemas/build'

type Db = MySql2Database<typeof schema>

/** The folder the test app stores uploads in (tests/support/global-setup.ts). */
export const testUploadsDir = () => resolve(loadConfig().dataDir, 'test-uploads')

/** The same storage the test app mounts, for services called directly. */
export function testUploadStore(): UploadStore {
  return createStorage({ driver: fsDriver({ base: testUploadsDir() }) }) as unknown as UploadStore
}

/** Every stored file's key, to prove a refused upload stored nothing. */
export function storedKeys(): Set<string> {
  const root = testUploadsDir()
  const out = new Set<string>()
  const walk = (dir: string) => {
    for (const name of readdirSync(dir)) {
      const full = join(dir, name)
      if (statSync(full).isDirectory()) walk(full)
      else out.add(relative(root, full).split('\\').join('/'))
    }
  }
  walk(root)
  return out
}

/** A pull file of an invented curve (the demo's parametric torque model), different for every seed. */
export function inventedPullCsv(seed: number, peakHp = 520): string {
  return pullCsv(makeCurve(seededRandom(seed), { peakHpTarget: peakHp, redline: 7000, boosted: false, stepRpm: 100 }))
}

/** An invented, plausible small-block combination with every field a build needs. */
export const COMPLETE_COMBINATION = {
  summary: 'A street/strip small block assembled and broken in on the engine dyno, pump gas, hydraulic roller cam.',
  engineFamily: 'Pushrod V8, small block',
  cylinders: 8,
  boreIn: 4.03,
  strokeIn: 3.75,
  rodLengthIn: 6,
  cylinderHeads: 'Aluminium 23° heads, CNC-ported',
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
  intakeManifold: 'Single-plane aluminium, port-matched',
  throttleBody: '1000 cfm four-barrel',
  injectorSizeLbHr: null,
  injectorCount: null,
  fuel: 'pump_gas',
  aspiration: 'na',
  engineManagement: 'Carburettor, distributor with locked timing',
  intendedUse: 'street_strip',
  priceCents: 1_450_000,
} as const

/** Pull metadata as the editor sends it, with SAE J1349 (2004) weather of a mild day. */
export function pullMeta(overrides: Partial<PullMeta> = {}): PullMeta {
  return {
    label: 'Break-in pull',
    dynoKind: 'engine',
    declaredStandard: 'SAE_J1349_2004',
    declaredFactor: null,
    weather: { baroInHg: 29.41, airTempF: 71, humidityPct: 38 },
    declaredPeakHp: null,
    declaredPeakHpRpm: null,
    declaredPeakTq: null,
    declaredPeakTqRpm: null,
    comparisonRole: null,
    changeKind: null,
    changeNote: null,
    ...overrides,
  }
}

/** Two seeded shops (the demo's first two) with their owners' ids. */
export async function twoShops(db: Db) {
  const rows = await db.select({ id: schema.shops.id, userId: schema.shops.userId, slug: schema.shops.slug })
    .from(schema.shops).where(inArray(schema.shops.slug, ['harrow-creek-engine-works', 'ninefold-machine']))
  const mine = rows.find(r => r.slug === 'harrow-creek-engine-works')!
  const other = rows.find(r => r.slug === 'ninefold-machine')!
  return { mine, other }
}

/** Counts of the rows an upload or a delete touches, to prove nothing was written or nothing was left. */
export async function fileRowCount(db: Db): Promise<number> {
  return (await db.select({ id: schema.files.id }).from(schema.files)).length
}

export async function pullsOf(db: Db, buildId: number) {
  return db.select().from(schema.dynoPulls).where(eq(schema.dynoPulls.buildId, buildId))
}

/** The ids of every build now in the test database, taken before a file starts making its own. */
export async function buildIds(db: Db): Promise<Set<number>> {
  return new Set((await db.select({ id: schema.builds.id }).from(schema.builds)).map(r => r.id))
}

/**
 * Deletes the builds a test file made (those not in `before`) through the editor's own delete, with
 * their pulls and files, so the files after it see the seeded builds as the seed left them.
 */
export async function removeBuildsSince(db: Db, before: Set<number>): Promise<void> {
  const rows = await db.select({ id: schema.builds.id, shopId: schema.shops.id, userId: schema.shops.userId })
    .from(schema.builds).innerJoin(schema.shops, eq(schema.shops.id, schema.builds.shopId))
  const store = testUploadStore()
  for (const row of rows.filter(r => !before.has(r.id))) {
    await deleteBuild(db as unknown as Database, store, { id: row.shopId, userId: row.userId }, row.id)
  }
}
