// `npm run bench`: every benchmark of the project, printed as one table. Figures go in the README.
// `npm run bench -- --no-http` skips the search route part (it builds and starts the app).
import { benchEngine } from './engine'
import { benchSearch } from './search'

const rows: { name: string, figure: string, target?: string }[] = []
for (const r of await benchEngine()) rows.push({ name: r.name, figure: `median ${r.medianMs.toFixed(2)} ms (${r.runs} runs)` })
rows.push(...await benchSearch({ http: !process.argv.includes('--no-http') }))

const width = Math.max(...rows.map(r => r.name.length))
console.log(`\nTorquewright benchmarks (node ${process.version}, ${new Date().toISOString()})`)
for (const r of rows) console.log(`  ${r.name.padEnd(width)}  ${r.figure}${r.target ? `   [target: ${r.target}]` : ''}`)
