import { auditLog } from '../database/schema'
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
  })
}
