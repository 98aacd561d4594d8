// `npm run bench`: every benchmark of the project, printed as one table. Figures go in the README.
import { benchEngine } from './engine'

const rows: { name: string, figure: string }[] = []
for (const r of await benchEngine()) rows.push({ name: r.name, figure: `median ${r.medianMs.toFixed(2)} ms (${r.runs} runs)` })

const width = Math.max(...rows.map(r => r.name.length))
console.log(`\nTorquewright benchmarks (node ${process.version}, ${new Date().toISOString()})`)
for (const r of rows) console.log(`  ${r.name.padEnd(width)}  ${r.figure}`)
