// `npx tsx scripts/cluster-throughput.ts [seconds]`: requests a second through HAProxy with 1, 2 and 3
// app instances on the Galera cluster (each count its own fresh cluster), for the README's "Scaling
// out". Two routes: the search API (the index, in each instance's memory) and the home page (a
// server render that reads MariaDB). autocannon drives 20 connections from this same machine.
import autocannon from 'autocannon'
import { cpus, loadavg } from 'node:os'
import { buildIfStale } from './lib/app'
import { clusterOptions, startCluster } from './lib/cluster'
import { loadConfig } from './lib/config'

const seconds = Number(process.argv[2]) || 15

async function measure(url: string): Promise<{ rps: number, p99: number, non2xx: number }> {
  const r = await autocannon({ url, connections: 20, duration: seconds, headers: { 'x-forwarded-for': '10.251.0.1' } })
  return { rps: r.requests.average, p99: r.latency.p99, non2xx: r.non2xx + r.errors + r.timeouts }
}

async function main() {
  await buildIfStale(loadConfig())
  const rows: string[] = []
  for (const instances of [1, 2, 3]) {
    const cluster = await startCluster(clusterOptions({ instances, log: () => {} }))
    try {
      await new Promise(r => setTimeout(r, 3000))
      const before = loadavg()[0]!.toFixed(2)
      const search = await measure(`${cluster.base}/api/search?q=turbo&perPage=20`)
      const home = await measure(`${cluster.base}/`)
      rows.push(`| ${instances} | ${search.rps.toFixed(0)} | ${search.p99} | ${home.rps.toFixed(0)} | ${home.p99} | ${search.non2xx + home.non2xx} | ${before} |`)
      console.log(rows.at(-1))
    }
    finally {
      await cluster.close()
    }
  }
  console.log(`\n${cpus().length} cores, ${seconds} s a route, 20 connections\n| instances | search req/s | search p99 ms | home req/s | home p99 ms | not 2xx | load avg before |\n|---|---|---|---|---|---|---|\n${rows.join('\n')}`)
  process.exit(0)
}

main().catch((err) => {
  console.error(err)
  process.exit(1)
})
