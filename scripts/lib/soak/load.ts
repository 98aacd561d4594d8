import { DEMO_PASSWORD, DEMO_RACERS, DEMO_SHOPS } from '../demo-data'
import { seededRandom, type Random } from '../../../shared/random'
import type { Client, Answer } from './http'
import { CookieJar, json, signIn } from './http'
import type { Sample } from './stats'

export type Role = 'anonymous' | 'racer' | 'shop'

/** A thread the run posts on: one racer's quote request to one shop. */
export interface Thread {
  id: number
  racer: string
  shop: string
}

/** One virtual user: its own client address, cookie jar, instance and (when signed in) account. */
export interface VirtualUser {
  index: number
  role: Role
  base: string
  address: string
  jar: CookieJar | null
  email: string | null
  threads: Thread[]
  lastSeen: Map<number, number>
  draftId: number | null
  random: Random
}

/** Every message the run posted, by its unique token, with what the poster was told. */
export interface MessageRecord {
  token: string
  phase: string
  threadId: number
  status: number
  error: string | null
}

/** Every autosave of one draft in the order sent, with what the shop was told. */
export interface DraftSave {
  title: string
  phase: string
  status: number
  error: string | null
}

export interface Ledger {
  runId: string
  messages: MessageRecord[]
  drafts: Map<number, { initial: string, saves: DraftSave[] }>
}

/** The weights of each role's actions: the anonymous browse and search, the signed-in talk and autosave. */
const MIX: Record<Role, [string, number][]> = {
  anonymous: [['page.home', 30], ['page.search', 25], ['page.build', 25], ['api.search', 20]],
  racer: [['message.post', 35], ['thread.poll', 65]],
  shop: [['message.post', 30], ['thread.poll', 40], ['draft.autosave', 30]],
}

/** The action kinds that need MariaDB for every answer (the public pages may be served from the search index alone). */
export const DATABASE_KINDS = new Set(['message.post', 'thread.poll', 'draft.autosave'])

const LINES = [
  'Checking in on the head work: any update on the port job?',
  'Block is back from the machine shop, deck is square.',
  'Can we move the dyno session to the morning slot?',
  'Cam card attached last week; confirm the lobe separation before you degree it.',
  'Fuel pressure held steady through the last pull.',
  'Please keep the break-in pulls short and watch the oil pressure.',
]
const SEARCH_WORDS = ['turbo', 'stroker', 'e85', 'drag', 'marine', 'street', 'aluminum', 'forged', 'methanol', 'big block']

function pickWeighted(random: Random, mix: [string, number][]): string {
  const total = mix.reduce((n, [, w]) => n + w, 0)
  let r = random.next() * total
  for (const [kind, weight] of mix) {
    r -= weight
    if (r < 0) return kind
  }
  return mix.at(-1)![0]
}

/** A loopback client address of its own for each virtual user (127.66.x.y: only a header, never a socket). */
export const addressOf = (index: number) => `127.66.${(index >> 8) & 255}.${(index & 255) || 254}`

/** A quote request body like the form's (shared/schemas/deals.ts quoteRequestSchema). */
function requestBody(shopSlug: string, racerIndex: number) {
  const deadline = new Date(Date.now() + 120 * 86_400_000).toISOString().slice(0, 10)
  return {
    shop: shopSlug,
    title: `Soak thread: bracket engine ${racerIndex + 1} for ${shopSlug}`,
    targetHp: 600 + racerIndex * 20,
    targetTq: 520,
    targetStandard: 'SAE_J1349_2004',
    displacementCapCi: 440,
    fuel: 'race_gas',
    aspiration: 'na',
    intendedUse: 'drag',
    transmission: 'manual',
    stallRpm: null,
    shiftRpm: 7200,
    budgetMinCents: 2_000_000,
    budgetMaxCents: 3_000_000,
    deadline,
    notes: 'Created by the soak run to carry its messages.',
  }
}

async function inBatches<T>(items: T[], size: number, work: (item: T) => Promise<void>): Promise<void> {
  for (let i = 0; i < items.length; i += size) await Promise.all(items.slice(i, i + size).map(work))
}

export interface Population {
  users: VirtualUser[]
  builds: { slug: string, title: string }[]
  ledger: Ledger
}

/**
 * Signs the virtual users in, gives every racer a thread with every shop and every shop user a
 * draft of its own, and collects build addresses for the anonymous users. Any refusal stops the run.
 */
export async function preparePopulation(client: Client, bases: string[], count: number, seed: number, runId: string, log: (line: string) => void): Promise<Population> {
  const base = bases[0]!
  const found = await client.send(`${base}/api/search?perPage=100`, { headers: { 'x-forwarded-for': addressOf(0) } })
  const builds = (json<{ hits?: { slug: string, title: string }[] }>(found)?.hits ?? []).map(h => ({ slug: h.slug, title: h.title }))
  if (found.status !== 200 || builds.length === 0) throw new Error(`GET /api/search answered ${found.status || found.error} with ${builds.length} builds: is the demo seeded?`)

  const signedIn = Math.round(count * 0.4)
  const racers = Math.round(signedIn / 2)
  const shops = signedIn - racers
  const users: VirtualUser[] = Array.from({ length: count }, (_, i) => {
    const role: Role = i < racers ? 'racer' : i < racers + shops ? 'shop' : 'anonymous'
    const email = role === 'racer'
      ? DEMO_RACERS[i % DEMO_RACERS.length]!.email
      : role === 'shop' ? DEMO_SHOPS[(i - racers) % DEMO_SHOPS.length]!.owner.email : null
    return {
      index: i, role, base: bases[i % bases.length]!, address: addressOf(i + 1), jar: role === 'anonymous' ? null : new CookieJar(), email,
      threads: [], lastSeen: new Map(), draftId: null, random: seededRandom(seed * 100_003 + i),
    }
  })

  const t0 = performance.now()
  await inBatches(users.filter(u => u.jar), 6, async (u) => {
    const refused = await signIn(client, u.base, u.jar!, u.address, u.email!, DEMO_PASSWORD)
    if (refused) throw new Error(`virtual user ${u.index} (${u.email}): ${refused}`)
  })
  log(`› ${racers + shops} virtual users signed in (${racers} racers, ${shops} shop users) in ${((performance.now() - t0) / 1000).toFixed(1)} s`)

  // One thread per racer account and shop, opened by the first virtual user of each racer account.
  const threads: Thread[] = []
  const openers = DEMO_RACERS.map(r => users.find(u => u.email === r.email)).filter((u): u is VirtualUser => !!u)
  for (const [racerIndex, opener] of openers.entries()) {
    await inBatches(DEMO_SHOPS, 4, async (shop) => {
      const res = await client.send(`${opener.base}/api/requests`, {
        method: 'POST', jar: opener.jar, headers: { 'x-forwarded-for': opener.address, 'content-type': 'application/json' },
        body: JSON.stringify(requestBody(shop.slug, racerIndex)),
      })
      const id = json<{ id?: number }>(res)?.id
      if (res.status !== 201 || !id) throw new Error(`POST /api/requests as ${opener.email} to ${shop.slug} answered ${res.status || res.error}: ${res.body.slice(0, 200)}`)
      threads.push({ id, racer: opener.email!, shop: shop.owner.email })
    })
  }
  for (const u of users) {
    if (u.role === 'racer') u.threads = threads.filter(t => t.racer === u.email)
    if (u.role === 'shop') u.threads = threads.filter(t => t.shop === u.email)
  }
  log(`› ${threads.length} quote-request threads opened (${openers.length} racers × ${DEMO_SHOPS.length} shops)`)

  const ledger: Ledger = { runId, messages: [], drafts: new Map() }
  await inBatches(users.filter(u => u.role === 'shop'), 6, async (u) => {
    const initial = `Soak draft ${runId} u${u.index}`
    const res = await client.send(`${u.base}/api/me/builds`, {
      method: 'POST', jar: u.jar, headers: { 'x-forwarded-for': u.address, 'content-type': 'application/json' }, body: JSON.stringify({ title: initial }),
    })
    const id = json<{ id?: number }>(res)?.id
    if (res.status !== 201 || !id) throw new Error(`POST /api/me/builds as ${u.email} answered ${res.status || res.error}: ${res.body.slice(0, 200)}`)
    u.draftId = id
    ledger.drafts.set(id, { initial, saves: [] })
  })
  log(`› ${ledger.drafts.size} drafts created, one per shop user`)
  return { users, builds, ledger }
}

/** The running phase as a virtual user sees it: when to stop, how many requests are left, where to record. */
export interface PhaseRun {
  name: string
  startedAt: number
  samples: Sample[]
  stop: boolean
  budget: number
  /** The first answer body of each action kind and failing status, to say what clients were told. */
  examples: Map<string, string>
}

async function act(client: Client, u: VirtualUser, kind: string, pop: Population, phase: PhaseRun, seq: number): Promise<Answer> {
  const r = u.random
  const headers = { 'x-forwarded-for': u.address }
  const jsonHeaders = { ...headers, 'content-type': 'application/json' }
  switch (kind) {
    case 'page.home':
      return client.send(`${u.base}/`, { headers: { ...headers, accept: 'text/html' } })
    case 'page.search': {
      const params = new URLSearchParams({ q: r.pick(SEARCH_WORDS) })
      if (r.next() < 0.5) params.set('aspiration', r.pick(['na', 'turbo', 'supercharged']))
      return client.send(`${u.base}/search?${params}`, { headers: { ...headers, accept: 'text/html' } })
    }
    case 'page.build':
      return client.send(`${u.base}/builds/${r.pick(pop.builds).slug}`, { headers: { ...headers, accept: 'text/html' } })
    case 'api.search': {
      const lo = r.int(250, 480)
      const params = new URLSearchParams({ ciMin: String(lo), ciMax: String(lo + r.int(30, 150)) })
      if (r.next() < 0.6) params.set('q', r.pick(SEARCH_WORDS))
      return client.send(`${u.base}/api/search?${params}`, { headers })
    }
    case 'thread.poll': {
      const thread = r.pick(u.threads)
      const after = u.lastSeen.get(thread.id) ?? 0
      const res = await client.send(`${u.base}/api/requests/${thread.id}/messages?after=${after}`, { headers, jar: u.jar })
      const lastId = json<{ lastId?: number }>(res)?.lastId
      if (res.status === 200 && typeof lastId === 'number') u.lastSeen.set(thread.id, lastId)
      return res
    }
    case 'message.post': {
      const thread = r.pick(u.threads)
      const token = `[soak ${pop.ledger.runId}-${phase.name}-u${u.index}-${seq}]`
      const res = await client.send(`${u.base}/api/requests/${thread.id}/messages`, {
        method: 'POST', jar: u.jar, headers: jsonHeaders, body: JSON.stringify({ body: `${token} ${r.pick(LINES)}` }),
      })
      pop.ledger.messages.push({ token, phase: phase.name, threadId: thread.id, status: res.status, error: res.error })
      return res
    }
    case 'draft.autosave': {
      const title = `Soak draft ${pop.ledger.runId} u${u.index} ${phase.name} save ${seq}`
      const res = await client.send(`${u.base}/api/me/builds/${u.draftId}`, {
        method: 'PATCH', jar: u.jar, headers: jsonHeaders, body: JSON.stringify({ title, boreIn: Number((4 + r.int(0, 60) / 1000).toFixed(3)) }),
      })
      pop.ledger.drafts.get(u.draftId!)!.saves.push({ title, phase: phase.name, status: res.status, error: res.error })
      return res
    }
    default:
      throw new Error(`unknown action ${kind}`)
  }
}

/** The message of a JSON error, or the start of any other body, on one line. */
function exampleOf(res: Answer): string {
  const message = json<{ message?: string }>(res)?.message
  return (message ?? res.body.replace(/<[^>]*>/g, ' ')).replace(/\s+/g, ' ').trim().slice(0, 160) || '(empty)'
}

/** One virtual user's loop: pick an action by weight, send it, pause, until the phase stops or its request budget is spent. */
export async function runUser(client: Client, u: VirtualUser, pop: Population, phase: PhaseRun, think: { min: number, max: number }): Promise<void> {
  let seq = 0
  // Spread the first requests over the first pause, so 200 users do not all start in the same millisecond.
  await new Promise(r => setTimeout(r, u.random.between(0, Math.max(think.max, 200))))
  while (!phase.stop && phase.budget > 0) {
    phase.budget--
    const kind = pickWeighted(u.random, MIX[u.role])
    const sentAt = performance.now() - phase.startedAt
    const res = await act(client, u, kind, pop, phase, ++seq)
    phase.samples.push({ kind, sentAt, doneAt: performance.now() - phase.startedAt, ms: res.ms, status: res.status, error: res.error })
    const key = `${kind} ${res.status || res.error}`
    if ((res.status < 200 || res.status >= 300) && !phase.examples.has(key)) phase.examples.set(key, exampleOf(res))
    const pause = think.max > 0 ? u.random.between(think.min, think.max) : 0
    if (pause > 0 && !phase.stop) await new Promise(r => setTimeout(r, pause))
  }
}
