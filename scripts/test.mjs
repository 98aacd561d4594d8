// `npm test`: installs what is missing, then lint, typecheck, build and every test tier.
import { runTs } from './ensure-deps.mjs'

await runTs('scripts/test-run.ts')
