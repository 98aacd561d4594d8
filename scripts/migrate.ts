// `npm run db:migrate`: applies pending migrations to the development database (or NUXT_DATABASE_URL).
import { databaseUrl, loadConfig } from './lib/config'
import { migrateDatabase } from './lib/migrate'

const cfg = loadConfig()
await migrateDatabase(process.env.NUXT_DATABASE_URL ?? databaseUrl(cfg, cfg.db.name))
console.log('migrations applied')
