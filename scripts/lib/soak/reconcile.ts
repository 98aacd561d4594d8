import mysql from 'mysql2/promise'
import type { Ledger } from './load'

/** What MariaDB holds against what the clients were told, for one phase. */
export interface Reconciliation {
  phase: string
  messages: {
    acknowledged: number
    acknowledgedStored: number
    /** Acknowledged with 201 but not in request_messages. */
    lost: string[]
    /** In request_messages more than once, whatever the answer was. */
    doubled: string[]
    unanswered: number
    unansweredStored: number
    /** Refused with a 4xx yet written. */
    refusedButStored: string[]
  }
  drafts: {
    /** Drafts autosaved during the phase. */
    saved: number
    /** The stored title is the last acknowledged one (the initial title when none was acknowledged). */
    lastAcknowledgedKept: number
    /** The stored title is a later save that got no answer (it may land or not). */
    unansweredLanded: number
    /** The stored title is a save that got no answer sent before the last acknowledged one, which it overwrote when it finished late. */
    overwrittenByEarlier: { draftId: number, acknowledged: string, stored: string }[]
    /** The stored title is an earlier save, the initial title, or none of the run's: the last acknowledged save was lost. */
    lost: { draftId: number, expected: string, stored: string | null }[]
  }
}

const acknowledged = (status: number) => status >= 200 && status < 300
/** No answer, or a server error: the write may or may not have happened, but never twice. */
const unanswered = (status: number) => status === 0 || status >= 500

/** Reads back, by their unique tokens, every message and draft title the phase wrote, and checks them against the answers. */
export async function reconcile(dbUrl: string, ledger: Ledger, phase: string): Promise<Reconciliation> {
  const connection = await mysql.createConnection({ uri: dbUrl })
  try {
    const [rows] = await connection.query<mysql.RowDataPacket[]>(
      'SELECT SUBSTRING_INDEX(body, \']\', 1) AS token, COUNT(*) AS n FROM request_messages WHERE body LIKE ? GROUP BY token',
      [`[soak ${ledger.runId}-${phase}-%`],
    )
    const stored = new Map<string, number>()
    for (const r of rows) stored.set(`${String(r.token)}]`, Number(r.n))
    const sent = ledger.messages.filter(m => m.phase === phase)
    const messages: Reconciliation['messages'] = { acknowledged: 0, acknowledgedStored: 0, lost: [], doubled: [], unanswered: 0, unansweredStored: 0, refusedButStored: [] }
    for (const m of sent) {
      const n = stored.get(m.token) ?? 0
      if (n > 1) messages.doubled.push(`${m.token} ×${n} (answered ${m.status || m.error})`)
      if (acknowledged(m.status)) {
        messages.acknowledged++
        if (n >= 1) messages.acknowledgedStored++
        else messages.lost.push(m.token)
      }
      else if (unanswered(m.status)) {
        messages.unanswered++
        if (n >= 1) messages.unansweredStored++
      }
      else if (n >= 1) {
        messages.refusedButStored.push(`${m.token} (answered ${m.status})`)
      }
    }

    const ids = [...ledger.drafts.keys()]
    const titles = new Map<number, string>()
    if (ids.length) {
      const [drafts] = await connection.query<mysql.RowDataPacket[]>('SELECT id, title FROM builds WHERE id IN (?)', [ids])
      for (const d of drafts) titles.set(Number(d.id), String(d.title))
    }
    const drafts: Reconciliation['drafts'] = { saved: 0, lastAcknowledgedKept: 0, unansweredLanded: 0, overwrittenByEarlier: [], lost: [] }
    for (const [id, { initial, saves }] of ledger.drafts) {
      if (!saves.some(s => s.phase === phase)) continue
      drafts.saved++
      // The whole history counts: the stored title is the last acknowledged save of any phase so far,
      // or a save that got no answer (it may have landed, even after a later one).
      const lastAck = saves.map(s => acknowledged(s.status)).lastIndexOf(true)
      const expected = lastAck >= 0 ? saves[lastAck]!.title : initial
      const stored = titles.get(id) ?? null
      const landed = stored === null ? -1 : saves.findIndex(s => unanswered(s.status) && s.title === stored)
      if (stored === expected) drafts.lastAcknowledgedKept++
      else if (landed > lastAck) drafts.unansweredLanded++
      else if (landed >= 0) drafts.overwrittenByEarlier.push({ draftId: id, acknowledged: expected, stored: stored! })
      else drafts.lost.push({ draftId: id, expected, stored })
    }
    return { phase, messages, drafts }
  }
  finally {
    await connection.end()
  }
}

/** True when nothing acknowledged was lost and nothing was written twice. */
export const reconciled = (r: Reconciliation) =>
  r.messages.lost.length === 0 && r.messages.doubled.length === 0 && r.messages.refusedButStored.length === 0 && r.drafts.lost.length === 0

export function reconciliationLines(r: Reconciliation): string[] {
  const m = r.messages
  const d = r.drafts
  const lines = [
    `  messages: ${m.acknowledged} acknowledged (201), ${m.acknowledgedStored} of them in request_messages; lost ${m.lost.length}, written twice ${m.doubled.length}`,
    `            ${m.unanswered} unanswered (timeout or 5xx): ${m.unansweredStored} of them were written anyway, none may be twice`,
    `  drafts:   ${d.saved} autosaved this phase: ${d.lastAcknowledgedKept} hold the last acknowledged title, ${d.unansweredLanded} a later unanswered save's; lost ${d.lost.length}`,
  ]
  if (d.overwrittenByEarlier.length) lines.push(`  note: ${d.overwrittenByEarlier.length} drafts hold an earlier save that timed out on the client and finished after the last acknowledged one`)
  if (m.refusedButStored.length) lines.push(`  refused (4xx) yet written: ${m.refusedButStored.length}: ${m.refusedButStored.slice(0, 5).join('; ')}`)
  if (m.lost.length) lines.push(`  lost messages (first 5): ${m.lost.slice(0, 5).join('; ')}`)
  if (m.doubled.length) lines.push(`  doubled messages (first 5): ${m.doubled.slice(0, 5).join('; ')}`)
  for (const l of d.lost.slice(0, 5)) lines.push(`  draft ${l.draftId}: expected "${l.expected}", stored "${l.stored}"`)
  return lines
}
