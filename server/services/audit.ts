import { and, asc, count, desc, eq, gte, like, lt, or, type SQL } from 'drizzle-orm'
import type { AuditQuery } from '../../shared/schemas/admin'
import type { AuditPage } from '../../shared/types/admin'
import { auditLog, users } from '../database/schema'
import type { Database } from '../database/types'

/** Anything that can run an insert: the database or an open transaction. */
type Writer = Pick<Database, 'insert'>

export interface AuditInput {
  actorId: number | null
  action: string
  entityType: string
  entityId: number
  before?: Record<string, unknown> | null
  after?: Record<string, unknown> | null
  note?: string | null
  /** The moment of the change, so the row and the changed columns carry one timestamp; the database's clock when absent. */
  at?: Date
}

/** Writes one audit row; call it with the transaction that makes the change, so both land or neither. */
export async function writeAudit(tx: Writer, entry: AuditInput): Promise<void> {
  await tx.insert(auditLog).values({
    actorId: entry.actorId,
    action: entry.action,
    entityType: entry.entityType,
    entityId: entry.entityId,
    before: entry.before ?? null,
    after: entry.after ?? null,
    note: entry.note ?? null,
    ...(entry.at ? { createdAt: entry.at } : {}),
  })
}

const DAY_MS = 86_400_000
const likePattern = (text: string) => `%${text.replace(/[\\%_]/g, c => `\\${c}`)}%`

/** Audit rows, newest first, filtered by action, entity, actor (name, e-mail or id) and whole UTC days. */
export async function listAudit(db: Database, query: AuditQuery): Promise<AuditPage> {
  const filters: SQL[] = []
  if (query.action) filters.push(eq(auditLog.action, query.action))
  if (query.entityType) filters.push(eq(auditLog.entityType, query.entityType))
  if (query.entityId) filters.push(eq(auditLog.entityId, query.entityId))
  if (query.actor) {
    const asId = /^\d+$/.test(query.actor) ? Number(query.actor) : null
    filters.push(or(like(users.email, likePattern(query.actor)), like(users.name, likePattern(query.actor)), ...(asId ? [eq(auditLog.actorId, asId)] : []))!)
  }
  if (query.from) filters.push(gte(auditLog.createdAt, new Date(`${query.from}T00:00:00Z`)))
  if (query.to) filters.push(lt(auditLog.createdAt, new Date(new Date(`${query.to}T00:00:00Z`).getTime() + DAY_MS)))
  const where = filters.length ? and(...filters) : undefined

  const [rows, totals, actions, entityTypes] = await Promise.all([
    db.select({ entry: auditLog, actor: { id: users.id, name: users.name, email: users.email } }).from(auditLog)
      .leftJoin(users, eq(users.id, auditLog.actorId))
      .where(where)
      .orderBy(desc(auditLog.createdAt), desc(auditLog.id))
      .limit(query.perPage).offset((query.page - 1) * query.perPage),
    db.select({ n: count() }).from(auditLog).leftJoin(users, eq(users.id, auditLog.actorId)).where(where),
    db.selectDistinct({ action: auditLog.action }).from(auditLog).orderBy(asc(auditLog.action)),
    db.selectDistinct({ entityType: auditLog.entityType }).from(auditLog).orderBy(asc(auditLog.entityType)),
  ])
  return {
    total: totals[0]?.n ?? 0,
    page: query.page,
    perPage: query.perPage,
    items: rows.map(({ entry, actor }) => ({
      id: entry.id,
      at: entry.createdAt.toISOString(),
      action: entry.action,
      entityType: entry.entityType,
      entityId: entry.entityId,
      actor: actor?.id ? { id: actor.id, name: actor.name, email: actor.email } : null,
      before: entry.before,
      after: entry.after,
      note: entry.note,
    })),
    actions: actions.map(a => a.action),
    entityTypes: entityTypes.map(e => e.entityType),
  }
}
