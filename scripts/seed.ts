// `npm run db:seed`: seeds the invented demo scenario into the development database (safe to run twice).
import { resolve } from 'node:path'
import { databaseUrl, loadConfig } from './lib/config'
import { seedDemo } from './lib/seed'

const cfg = loadConfig()
const result = await seedDemo({ url: process.env.NUXT_DATABASE_URL ?? databaseUrl(cfg, cfg.db.name), uploadsDir: resolve(cfg.dataDir, 'uploads') })
console.log(`demo scenario: ${result.builds} builds, ${result.created} new`)
