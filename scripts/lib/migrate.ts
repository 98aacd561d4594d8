import { resolve } from 'node:path'
import { drizzle } from 'drizzle-orm/mysql2'
import { migrate } from 'drizzle-orm/mysql2/migrator'
import mysql from 'mysql2/promise'

/** Applies every pending drizzle-kit migration to the database at `url`. */
export async function migrateDatabase(url: string): Promise<void> {
  const connection = await mysql.createConnection({ uri: url, multipleStatements: true })
  try {
    await migrate(drizzle(connection), { migrationsFolder: resolve(import.meta.dirname, '..', '..', 'server', 'database', 'migrations') })
  }
  finally {
    await connection.end()
  }
}
