/**
 * Page benchmark: requests/s and p99 of the server-rendered pages beside a bare Nuxt page of the
 * same pinned Nuxt (one component, 40 paragraphs) built and served the same way, and the first-load
 * bytes of each page's scripts and styles. Loopback only; the bench servers use ports 3660–3669
 * (TW_BENCH_PORT moves the first). Run alone with `npm run bench -- pages` or `npx tsx bench/pages.ts`;
 * `--duration <s>` changes the 10-second runs. Figures go in the README.
 */
import { spawn, type ChildProcess } from 'node:child_process'
import { createHash } from 'node:crypto'
import { get as httpGet } from 'node:http'
import { existsSync, mkdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import { loadavg } from 'node:os'
import { resolve } from 'node:path'
import { pathToFileURL } from 'node:url'
import { brotliCompressSync, constants as zlib, gzipSync } from 'node:zlib'
import autocannon from 'autocannon'
import { appEnv, buildIfStale, startBuiltServer } from '../scripts/lib/app'
import { databaseUrl, loadConfig, type ServiceConfig } from '../scripts/lib/config'
import { ensureDatabase, recreateDatabase, startMariadb, stopMariadb } from '../scripts/lib/mariadb'
import { migrateDatabase } from '../scripts/lib/migrate'
import { run, waitFor } from '../scripts/lib/process'
import { seedDemo } from '../scripts/lib/seed'

export interface PageBenchRow {
  name: string
  figure: string
  target?: string
}

const BENCH_DATABASE = 'torquewright_bench_pages'
export const benchPorts = () => {
  const first = Number(process.env.TW_BENCH_PORT ?? 3660)
  return { app: first, bare: first + 1 }
}

/** The bare page's files: the same pinned Nuxt, one component of 40 paragraphs, nothing else. */
function bareFiles(nuxtVersion: string): Record<string, string> {
  const paragraphs = Array.from({ length: 40 }, (_, i) => `    <p>Paragraph ${i + 1}: a plain line of text to render on the server.</p>`).join('\n')
  return {
    'package.json': JSON.stringify({ name: 'torquewright-bench-bare', private: true, type: 'module', dependencies: { nuxt: nuxtVersion } }, null, 2),
    'nuxt.config.ts': `export default defineNuxtConfig({ compatibilityDate: '2026-11-01', devtools: { enabled: false }, telemetry: false })\n`,
    'app.vue': `<template>\n  <BarePage />\n</template>\n`,
    'components/BarePage.vue': `<template>\n  <main>\n    <h1>Bare page</h1>\n${paragraphs}\n  </main>\n</template>\n`,
  }
}

/** Builds the bare page under .data/bench-bare unless the same files were built before; reuses the project's node_modules. */
export async function buildBare(cfg: ServiceConfig): Promise<string> {
  const dir = resolve(cfg.dataDir, 'bench-bare')
  const nuxtVersion = (JSON.parse(readFileSync(createRequire(import.meta.url).resolve('nuxt/package.json'), 'utf8')) as { version: string }).version
  const files = bareFiles(nuxtVersion)
  const stamp = createHash('sha256').update(JSON.stringify(files)).digest('hex')
  const stampFile = resolve(dir, '.output', '.source-stamp')
  if (existsSync(stampFile) && readFileSync(stampFile, 'utf8') === stamp) return dir
  console.log(`› building the bare Nuxt ${nuxtVersion} page in ${dir}…`)
  rmSync(dir, { recursive: true, force: true })
  mkdirSync(resolve(dir, 'components'), { recursive: true })
  for (const [name, text] of Object.entries(files)) writeFileSync(resolve(dir, name), text)
  symlinkSync(resolve(cfg.root, 'node_modules'), resolve(dir, 'node_modules'), 'dir')
  await run(resolve(cfg.root, 'node_modules', '.bin', 'nuxt'), ['build'], { cwd: dir, env: { ...process.env, NUXT_TELEMETRY_DISABLED: '1' } })
  writeFileSync(stampFile, stamp)
  return dir
}

async function startBare(dir: string, port: number): Promise<ChildProcess> {
  const child = spawn(process.execPath, [resolve(dir, '.output', 'server', 'index.mjs')], {
    cwd: dir, stdio: ['ignore', 'ignore', 'inherit'],
    env: { ...process.env, NODE_ENV: 'production', HOST: '127.0.0.1', PORT: String(port), NITRO_HOST: '127.0.0.1', NITRO_PORT: String(port) },
  })
  await waitFor(`the bare page on port ${port}`, async () => {
    try {
      return (await fetch(`http://127.0.0.1:${port}/`)).ok
    }
    catch {
      return false
    }
  }, 60_000)
  return child
}

export interface PageStack {
  app: string
  bare: string
  /** The pages measured, by name, as paths on the app. */
  pages: { name: string, path: string }[]
  close: () => Promise<void>
}

/** MariaDB with a fresh demo-seeded database, the built app and the built bare page, on loopback. */
export async function startPageStack(opts: { bare?: boolean } = {}): Promise<PageStack> {
  const cfg = loadConfig()
  const ports = benchPorts()
  await buildIfStale(cfg)
  const bareDir = opts.bare === false ? null : await buildBare(cfg)
  const closers: (() => Promise<unknown> | unknown)[] = []
  const close = async () => {
    for (const c of closers.reverse()) await c()
  }
  const stop = (child: ChildProcess) => async () => {
    if (child.exitCode !== null || child.signalCode !== null) return
    const exited = new Promise(r => child.once('exit', r))
    child.kill('SIGTERM')
    await exited
  }
  try {
    const startedDb = await startMariadb(cfg)
    closers.push(async () => {
      if (startedDb) await stopMariadb(cfg)
    })
    recreateDatabase(cfg, BENCH_DATABASE)
    ensureDatabase(cfg, BENCH_DATABASE)
    const url = databaseUrl(cfg, BENCH_DATABASE)
    await migrateDatabase(url)
    const uploadsDir = resolve(cfg.dataDir, 'bench-pages-uploads')
    rmSync(uploadsDir, { recursive: true, force: true })
    await seedDemo({ url, uploadsDir })
    const server = await startBuiltServer(cfg, appEnv(cfg, { database: BENCH_DATABASE, port: ports.app, smtpPort: cfg.mail.smtpPort, uploadsDir }), 'pipe')
    server.stdout?.resume()
    server.stderr?.resume()
    closers.push(stop(server))
    if (bareDir) closers.push(stop(await startBare(bareDir, ports.bare)))
    const app = `http://127.0.0.1:${ports.app}`
    // A verified build with dyno pulls, as a racer would open it from search.
    await waitFor('the search index', async () => ((await (await fetch(`${app}/api/search?perPage=1`)).json()) as { total: number }).total > 0, 60_000)
    const found = await (await fetch(`${app}/api/search?perPage=1&verified=true`)).json() as { hits: { slug: string }[] }
    const slug = found.hits[0]?.slug
    if (!slug) throw new Error('the seeded database has no verified build')
    return {
      app, bare: `http://127.0.0.1:${ports.bare}`, close,
      pages: [
        { name: 'home', path: '/' },
        { name: 'build page', path: `/builds/${slug}` },
        { name: 'search', path: '/search?ciMin=400&ciMax=450' },
        { name: 'tools', path: '/tools' },
        { name: 'sign-in', path: '/sign-in' },
      ],
    }
  }
  catch (err) {
    await close()
    throw err
  }
}

/** One autocannon run: 20 connections for `seconds`, after a short warm-up. */
async function load(url: string, seconds: number): Promise<{ rps: number, p99: number, errors: number }> {
  await autocannon({ url, connections: 20, duration: 2 })
  const r = await autocannon({ url, connections: 20, duration: seconds })
  return { rps: r.requests.average, p99: r.latency.p99, errors: r.errors + r.non2xx + r.timeouts }
}

const gz = (b: Buffer) => gzipSync(b, { level: 9 }).length
const br = (b: Buffer) => brotliCompressSync(b, { params: { [zlib.BROTLI_PARAM_QUALITY]: 11, [zlib.BROTLI_PARAM_SIZE_HINT]: b.length } }).length
const kb = (n: number) => `${(n / 1024).toFixed(1)} KB`

/** The scripts and styles a first visit loads: script src, modulepreload and stylesheet links of the HTML. */
export function firstLoadAssets(html: string): { scripts: string[], styles: string[] } {
  const attr = (tag: string, name: string) => new RegExp(`\\s${name}="([^"]*)"`).exec(tag)?.[1]
  const scripts = new Set<string>()
  const styles = new Set<string>()
  for (const m of html.matchAll(/<script\b[^>]*>/g)) {
    const src = attr(m[0], 'src')
    if (src) scripts.add(src)
  }
  for (const m of html.matchAll(/<link\b[^>]*>/g)) {
    const rel = attr(m[0], 'rel')
    const href = attr(m[0], 'href')
    if (!href) continue
    if (rel === 'modulepreload') scripts.add(href)
    if (rel === 'stylesheet') styles.add(href)
  }
  return { scripts: [...scripts], styles: [...styles] }
}

export interface FirstLoad {
  html: { raw: number, gzip: number, brotli: number }
  scripts: { raw: number, gzip: number, brotli: number, files: number }
  styles: { raw: number, gzip: number, brotli: number, files: number }
  /** What the server itself sent for the HTML when asked for gzip/brotli. */
  served: string
}

/** The bytes the server sends for a URL, as they come (fetch would decode them), and their Content-Encoding. */
function onTheWire(url: string, acceptEncoding: string): Promise<{ bytes: number, encoding: string | null }> {
  return new Promise((resolveWire, reject) => {
    httpGet(url, { headers: { 'accept-encoding': acceptEncoding } }, (res) => {
      let bytes = 0
      res.on('data', (chunk: Buffer) => {
        bytes += chunk.length
      })
      res.on('end', () => resolveWire({ bytes, encoding: res.headers['content-encoding'] ?? null }))
    }).on('error', reject)
  })
}

/** First-load bytes of one page: raw and compressed (gzip -9, brotli 11) sizes of its HTML, scripts and styles. */
export async function firstLoad(base: string, path: string): Promise<FirstLoad> {
  const res = await fetch(base + path, { headers: { 'accept-encoding': 'identity' } })
  const html = Buffer.from(await res.arrayBuffer())
  const assets = firstLoadAssets(html.toString('utf8'))
  const sum = async (urls: string[]) => {
    const out = { raw: 0, gzip: 0, brotli: 0, files: urls.length }
    for (const u of urls) {
      const body = Buffer.from(await (await fetch(new URL(u, base), { headers: { 'accept-encoding': 'identity' } })).arrayBuffer())
      out.raw += body.length
      out.gzip += gz(body)
      out.brotli += br(body)
    }
    return out
  }
  const asked = await onTheWire(base + path, 'br, gzip')
  const served = asked.encoding ? `${asked.encoding}, ${kb(asked.bytes)} on the wire` : 'uncompressed'
  return { html: { raw: html.length, gzip: gz(html), brotli: br(html) }, scripts: await sum(assets.scripts), styles: await sum(assets.styles), served }
}

/** Every figure of the page part. */
export async function benchPages(opts: { seconds?: number } = {}): Promise<PageBenchRow[]> {
  const seconds = opts.seconds ?? 10
  const rows: PageBenchRow[] = []
  const stack = await startPageStack()
  try {
    const load0 = loadavg()[0]!
    const bare = await load(`${stack.bare}/`, seconds)
    rows.push({ name: 'bare Nuxt page (same Nuxt, 40 paragraphs)', figure: `${bare.rps.toFixed(0)} req/s · p99 ${bare.p99} ms` })
    for (const p of stack.pages) {
      const r = await load(stack.app + p.path, seconds)
      rows.push({
        name: `page ${p.name} (${p.path})`,
        figure: `${r.rps.toFixed(0)} req/s · p99 ${r.p99} ms · ${(r.rps / bare.rps).toFixed(2)}× bare${r.errors ? ` · ${r.errors} errors/non-2xx` : ''}`,
        target: p.name === 'sign-in' ? undefined : '≥ 0.5× bare',
      })
    }
    for (const p of stack.pages.filter(x => x.name !== 'sign-in')) {
      const f = await firstLoad(stack.app, p.path)
      rows.push({
        name: `first load ${p.name}: scripts (${f.scripts.files}) gzip / brotli`,
        figure: `${kb(f.scripts.gzip)} / ${kb(f.scripts.brotli)} (raw ${kb(f.scripts.raw)})`,
        target: p.name === 'tools' ? undefined : 'JS < 100 KB gzip',
      })
      rows.push({ name: `first load ${p.name}: styles (${f.styles.files}) gzip / brotli`, figure: `${kb(f.styles.gzip)} / ${kb(f.styles.brotli)} (raw ${kb(f.styles.raw)})` })
      rows.push({ name: `first load ${p.name}: HTML gzip / brotli`, figure: `${kb(f.html.gzip)} / ${kb(f.html.brotli)} (raw ${kb(f.html.raw)}); served ${f.served}` })
    }
    rows.push({ name: 'page bench: 20 connections, loopback; load average before / after', figure: `${load0.toFixed(1)} / ${loadavg()[0]!.toFixed(1)} (2 cores)` })
  }
  finally {
    await stack.close()
  }
  return rows
}

export function secondsArg(argv: string[]): number | undefined {
  const i = argv.indexOf('--duration')
  return i >= 0 ? Number(argv[i + 1]) : undefined
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const rows = await benchPages({ seconds: secondsArg(process.argv) })
  const width = Math.max(...rows.map(r => r.name.length))
  for (const r of rows) console.log(`  ${r.name.padEnd(width)}  ${r.figure}${r.target ? `   [target: ${r.target}]` : ''}`)
}
