// `npm run admin:create -- <email> [name]`: makes an existing account an admin, or creates an admin
// account and prints a one-time sign-in link (valid 24 hours). Admins are never made by sign-up.
import { drizzle } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import * as schema from '../server/database/schema'
import { createAdmin, findUserByEmail, issueLink, makeAdmin } from '../server/services/accounts'
import type { Database } from '../server/database/types'
import { emailSchema } from '../shared/schemas/auth'
import { databaseUrl, loadConfig } from './lib/config'
import { startMariadb, stopMariadb } from './lib/mariadb'
import { migrateDatabase } from './lib/migrate'
import { UserFacingError } from './lib/process'

const LINK_HOURS = 24

async function main(): Promise<void> {
  const parsed = emailSchema.safeParse(process.argv[2] ?? '')
  if (!parsed.success) throw new UserFacingError(`usage: npm run admin:create -- <email> [name]\n${parsed.error.issues[0]?.message}`)
  const email = parsed.data
  const name = (process.argv[3] ?? '').trim() || email.split('@')[0]!

  const cfg = loadConfig()
  const url = process.env.NUXT_DATABASE_URL ?? databaseUrl(cfg, cfg.db.name)
  const startedDb = process.env.NUXT_DATABASE_URL ? false : await startMariadb(cfg)
  const connection = await mysql.createConnection({ uri: url, timezone: 'Z' })
  try {
    await migrateDatabase(url)
    const db = drizzle(connection, { schema, mode: 'default' }) as unknown as Database
    const existing = await findUserByEmail(db, email)
    if (existing) {
      try {
        const outcome = await makeAdmin(db, null, existing.id)
        console.log(outcome === 'already' ? `${email} is already an admin.` : `${email} is now an admin (was ${existing.role}).`)
      }
      catch (err) {
        throw new UserFacingError((err as Error).message)
      }
      return
    }
    const id = await createAdmin(db, email, name)
    const token = await issueLink(db, { userId: id, purpose: 'sign_in', ttlMs: LINK_HOURS * 3_600_000 })
    const origin = process.env.NUXT_PUBLIC_SITE_URL ?? `http://127.0.0.1:${cfg.app.port}`
    console.log(`Created the admin account ${email}.`)
    console.log(`One-time sign-in link (works once, for ${LINK_HOURS} hours; then set a password on the account page):`)
    console.log(`${origin}/sign-in/link?token=${token}`)
  }
  finally {
    await connection.end()
    if (startedDb) await stopMariadb(cfg)
  }
}

main().catch((err) => {
  console.error(err instanceof UserFacingError ? err.message : err)
  process.exit(1)
})
