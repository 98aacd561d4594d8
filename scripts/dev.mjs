// `npm run dev`: the same services as the demo, with Nuxt's development server.
import { runTs } from './ensure-deps.mjs'

await runTs('scripts/dev-run.ts')
