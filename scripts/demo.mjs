// `npm run demo`: installs what is missing, starts the services, migrates, seeds, builds and serves the demo.
import { runTs } from './ensure-deps.mjs'

await runTs('scripts/demo-run.ts')
