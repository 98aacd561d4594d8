// A racer's class rules: kept as one JSON document per racer, read back through the same schema.
import { eq } from 'drizzle-orm'
import { classRulesSchema, type ClassRules } from '#shared/schemas/class-rules'
import { classRules } from '../database/schema'
import type { Database } from '../database/types'

/** The racer's class rules, or null when none are saved (or the stored ones no longer pass the schema). */
export async function getClassRules(db: Database, userId: number): Promise<ClassRules | null> {
  const [row] = await db.select({ rules: classRules.rules }).from(classRules).where(eq(classRules.userId, userId)).limit(1)
  if (!row) return null
  const parsed = classRulesSchema.safeParse(row.rules)
  if (!parsed.success) console.warn(`class rules of user ${userId} no longer pass the schema`)
  return parsed.success ? parsed.data : null
}

/** Saves (or replaces) the racer's class rules in one statement and returns them as stored. */
export async function saveClassRules(db: Database, userId: number, rules: ClassRules): Promise<ClassRules> {
  await db.insert(classRules).values({ userId, rules }).onDuplicateKeyUpdate({ set: { rules, updatedAt: new Date() } })
  return (await getClassRules(db, userId))!
}
