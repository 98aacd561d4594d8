// `npm run cluster`: installs what is missing, then a three-node Galera cluster, app instances and HAProxy on loopback.
import { runTs } from './ensure-deps.mjs'

await runTs('scripts/cluster-run.ts')
