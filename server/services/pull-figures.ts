// The stored side of the pull pipeline (shared/pulls/figures.ts): each pull's derived figures are written
// with the pull in its own transaction and read from here by the build page, the search index, compare and
// the review desk. A pull without a row, or with a row of an older PULL_FIGURES_VERSION (a pull saved
// before the table existed, or by an older derivation), is computed from its raw file on its first read
// and stored, so the next read finds it.
import { eq, inArray } from 'drizzle-orm'
import { parsePull } from '#shared/engine/parse'
import { PULL_FIGURES_VERSION, declaredStandardOf, derivePullFigures, weatherOf, type DerivedPullFigures } from '#shared/pulls/figures'
import { dynoPulls, files, pullFigures } from '../database/schema'
import type { Database } from '../database/types'
import type { ReadStoredText } from './curves'
import type { Tx } from './build-files'

/** Writes (or replaces) a pull's derived figures; call it in the transaction that saves the pull. */
export async function storePullFigures(tx: Tx | Database, pullId: number, figures: DerivedPullFigures): Promise<void> {
  const values = { version: figures.version, standards: figures.standards, curve: figures.curve, searchCurve: figures.searchCurve }
  await tx.insert(pullFigures).values({ pullId, ...values }).onDuplicateKeyUpdate({ set: { ...values, computedAt: new Date() } })
}

/** A pull's derived figures computed from its raw file, or null when the file is gone or no longer parses. */
async function computeFromFile(read: ReadStoredText, pull: { id: number, declaredStandard: string, baroInHg: number | null, airTempF: number | null, humidityPct: number | null }, storageKey: string): Promise<DerivedPullFigures | null> {
  const text = await read(storageKey)
  if (text === null) {
    console.warn(`pull figures: the file ${storageKey} of pull ${pull.id} is missing from storage`)
    return null
  }
  const parsed = parsePull(text)
  if (!parsed.ok) {
    console.warn(`pull figures: the stored file of pull ${pull.id} no longer parses`)
    return null
  }
  try {
    return derivePullFigures(parsed.points, declaredStandardOf(pull), weatherOf(pull))
  }
  catch (err) {
    // A stored file the engine module refuses (it was checked on upload) leaves that pull out, never the page.
    console.warn(`pull figures: pull ${pull.id} could not be derived (${(err as Error).message})`)
    return null
  }
}

/**
 * The stored figures of the given pulls, by pull id. Rows missing or of an older version are computed
 * from the raw file and stored first; a pull whose file is unreadable is absent from the answer.
 */
export async function pullFiguresFor(db: Database, read: ReadStoredText, pullIds: readonly number[]): Promise<Map<number, DerivedPullFigures>> {
  const out = new Map<number, DerivedPullFigures>()
  const ids = [...new Set(pullIds)]
  if (!ids.length) return out
  const rows = await db.select().from(pullFigures).where(inArray(pullFigures.pullId, ids))
  for (const r of rows) {
    if (r.version === PULL_FIGURES_VERSION) out.set(r.pullId, { version: r.version, standards: r.standards, curve: r.curve, searchCurve: r.searchCurve })
  }
  const stale = ids.filter(id => !out.has(id))
  if (!stale.length) return out
  const sources = await db.select({ pull: dynoPulls, storageKey: files.storageKey }).from(dynoPulls)
    .innerJoin(files, eq(files.id, dynoPulls.fileId)).where(inArray(dynoPulls.id, stale))
  for (const { pull, storageKey } of sources) {
    const figures = await computeFromFile(read, pull, storageKey)
    if (!figures) continue
    try {
      await storePullFigures(db, pull.id, figures)
    }
    catch (err) {
      // The pull was deleted meanwhile (the foreign key refuses the row): answer what was computed.
      console.warn(`pull figures: pull ${pull.id} could not be stored (${(err as Error).message})`)
    }
    out.set(pull.id, figures)
  }
  return out
}
