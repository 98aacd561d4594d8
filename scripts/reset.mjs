// `npm run demo:reset`: stops the local services and wipes the data folder (database, uploads, mail).
import { spawnSync } from 'node:child_process'
import { rmSync } from 'node:fs'
import { resolve } from 'node:path'

const root = resolve(import.meta.dirname, '..')
const dataDir = resolve(root, process.env.TW_DATA_DIR ?? '.data')
spawnSync('npx', ['tsx', 'scripts/services.ts', 'stop'], { cwd: root, stdio: 'inherit' })
rmSync(dataDir, { recursive: true, force: true })
console.log(`wiped ${dataDir}`)
