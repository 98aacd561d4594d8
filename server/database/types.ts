import type { MySql2Database } from 'drizzle-orm/mysql2'
import type * as schema from './schema'

/** The database client type; services take it as a parameter so tests can pass their own connection. */
export type Database = MySql2Database<typeof schema>
