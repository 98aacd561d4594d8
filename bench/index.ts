// `npm run bench`: every benchmark of the project, printed as one table. Figures go in the README.
// `npm run bench -- pages` (or `engine`, `search`) runs only the parts named; `--no-http` skips the
// search route part (it builds and starts the app); `--duration <s>` sets the page part's runs.
import { benchEngine } from './engine'
import { benchPages, secondsArg } from './pages'
import { benchSearch } from './search'

const args = process.argv.slice(2)
const named = ['engine', 'search', 'pages'].filter(p => args.includes(p))
const wants = (part: string) => named.length === 0 || named.includes(part)

const rows: { name: string, figure: string, target?: string }[] = []
if (wants('engine')) for (const r of await benchEngine()) rows.push({ name: r.name, figure: `median ${r.medianMs.toFixed(2)} ms (${r.runs} runs)` })
if (wants('search')) rows.push(...await benchSearch({ http: !args.includes('--no-http') }))
if (wants('pages')) rows.push(...await benchPages({ seconds: secondsArg(args) }))

const width = Math.max(...rows.map(r => r.name.length))
console.log(`\nTorquewright benchmarks (node ${process.version}, ${new Date().toISOString()})`)
for (const r of rows) console.log(`  ${r.name.padEnd(width)}  ${r.figure}${r.target ? `   [target: ${r.target}]` : ''}`)
