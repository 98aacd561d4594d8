import { inArray } from 'drizzle-orm'
import { forTargetQuery } from '#shared/schemas/search'
import { SCORE_EXPLAINED, combinedScore, compactRecord, recordScore } from '#shared/reviews/track-record'
import { rankShopsForTarget } from '../../../search/rank'
import { shops } from '../../database/schema'
import { useSearchIndex } from '../../services/search'
import { trackRecords } from '../../services/track-record'

/**
 * Shops ranked by their verified builds near a displacement and power target and by their track
 * record (the formula is in `scoreExplained` and the README). Public. With `ciMin` and `ciMax` the
 * racer's own displacement range is kept as it is (`ci` defaults to its middle).
 */
export default defineEventHandler(async (event) => {
  const query = await getValidatedQuery(event, validator(forTargetQuery))
  const index = await useSearchIndex()
  const ci = query.ci ?? ((query.ciMin as number) + (query.ciMax as number)) / 2
  // Every proven shop is ranked first, so the record can lift or filter any of them before the limit.
  const ranking = rankShopsForTarget(index, { ci, ciMin: query.ciMin, ciMax: query.ciMax, hp: query.hp as number, aspiration: query.aspiration, fuel: query.fuel, limit: 10_000 })
  const slugs = ranking.shops.map(s => s.shop.slug)
  const db = useDb()
  const ids = slugs.length === 0 ? [] : await db.select({ id: shops.id, slug: shops.slug }).from(shops).where(inArray(shops.slug, slugs))
  const idBySlug = new Map(ids.map(r => [r.slug, r.id]))
  const records = await trackRecords(db, ids.map(r => r.id))
  const shopRows = ranking.shops.flatMap((s) => {
    const record = records.get(idBySlug.get(s.shop.slug) ?? -1)
    if (!record) return []
    const rScore = recordScore(record)
    return [{ ...s, proofScore: s.score, recordScore: rScore, score: combinedScore(s.score, rScore), record, recordText: compactRecord(record) }]
  }).filter(s => (query.minOnTimePct === undefined || (s.record.onTime.sharePct ?? -1) >= query.minOnTimePct)
    && (query.minCompleted === undefined || s.record.orders.completed >= query.minCompleted))
  const key = query.sort === 'record' ? 'recordScore' : query.sort === 'proof' ? 'proofScore' : 'score'
  shopRows.sort((a, b) => b[key] - a[key] || b.score - a.score || a.shop.slug.localeCompare(b.shop.slug))
  return { ...ranking, target: { ...ranking.target, limit: query.limit }, sort: query.sort, scoreExplained: SCORE_EXPLAINED, shops: shopRows.slice(0, query.limit) }
})
