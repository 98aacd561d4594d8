// `npm run cluster [-- --instances 2]`: the distributed setup rehearsed on one machine (README,
// "Scaling out"). Builds the app if its sources changed, starts everything, prints the addresses,
// and stops all of it on Ctrl-C.
import { parseArgs } from 'node:util'
import { buildIfStale } from './lib/app'
import { clusterOptions, startCluster } from './lib/cluster'
import { loadConfig } from './lib/config'
import { UserFacingError } from './lib/process'

async function main() {
  const { values } = parseArgs({ options: { instances: { type: 'string', default: '3' }, help: { type: 'boolean', default: false } } })
  if (values.help) {
    console.log('npm run cluster [-- --instances 1|2|3]   ports 4400–4509 (TW_CLUSTER_PORT moves the block); uploads in MariaDB (NUXT_UPLOADS_DRIVER=fs for a shared folder)')
    return
  }
  const instances = Number(values.instances)
  if (!Number.isInteger(instances) || instances < 1 || instances > 3) throw new UserFacingError('--instances is 1, 2 or 3.')
  await buildIfStale(loadConfig())
  const cluster = await startCluster(clusterOptions({ instances }))
  let stopping = false
  const stop = async () => {
    if (stopping) return
    stopping = true
    console.log('\n› stopping the instances, the balancer and the Galera nodes…')
    await cluster.close()
    process.exit(0)
  }
  process.on('SIGINT', () => void stop())
  process.on('SIGTERM', () => void stop())
  console.log(`
Torquewright cluster is up (Ctrl-C stops all of it)
  site, through HAProxy:   ${cluster.base}
  app instances:           ${cluster.apps.map(a => a.base).join(', ')}
  Galera nodes (MariaDB):  ${cluster.nodes.map(n => `127.0.0.1:${n.port}`).join(', ')}  (cluster size ${cluster.clusterSize()})
  data and logs:           ${cluster.nodes[0]!.dir.replace(/\/node1$/, '')}
  demo sign-in:            see README "Demo accounts" (same password as npm run demo)`)
  await new Promise(() => {})
}

main().catch((err) => {
  console.error(err instanceof UserFacingError ? err.message : err)
  process.exit(1)
})
