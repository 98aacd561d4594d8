/**
 * What changed from one quote revision to the next, as short sentences a racer can read: the total,
 * the line items (matched by category and description), the milestones (by position), the guarantee
 * and the validity. Pure; money in integer cents.
 */
export interface RevisionLike {
  totalCents: number
  validUntil: string
  guarantee: { hp: number, tolerancePct: number, standard: string } | null
  lineItems: { category: string, description: string, quantity: number, unitPriceCents: number, lineTotalCents: number }[]
  milestones: { position: number, title: string, amountCents: number, dueDate: string }[]
}

const dollars = (cents: number) => `$${(Math.abs(cents) / 100).toLocaleString('en-US', { minimumFractionDigits: 2, maximumFractionDigits: 2 })}`
const signed = (cents: number) => `${cents < 0 ? '−' : '+'}${dollars(cents)}`

export function revisionChanges(before: RevisionLike, after: RevisionLike): string[] {
  const out: string[] = []
  if (before.totalCents !== after.totalCents) out.push(`Total ${dollars(before.totalCents)} → ${dollars(after.totalCents)} (${signed(after.totalCents - before.totalCents)}).`)
  const key = (l: RevisionLike['lineItems'][number]) => `${l.category.trim().toLowerCase()}|${l.description.trim().toLowerCase()}`
  const old = new Map(before.lineItems.map(l => [key(l), l]))
  const now = new Map(after.lineItems.map(l => [key(l), l]))
  for (const [k, l] of now) {
    const was = old.get(k)
    if (!was) out.push(`Line added: ${l.description} (${dollars(l.lineTotalCents)}).`)
    else if (was.lineTotalCents !== l.lineTotalCents || was.quantity !== l.quantity) out.push(`Line changed: ${l.description}, ${dollars(was.lineTotalCents)} → ${dollars(l.lineTotalCents)}.`)
  }
  for (const [k, l] of old) if (!now.has(k)) out.push(`Line removed: ${l.description} (${dollars(l.lineTotalCents)}).`)
  const count = Math.max(before.milestones.length, after.milestones.length)
  for (let i = 0; i < count; i++) {
    const was = before.milestones[i]
    const m = after.milestones[i]
    if (!was && m) out.push(`Milestone ${i + 1} added: ${m.title}, ${dollars(m.amountCents)} due ${m.dueDate}.`)
    else if (was && !m) out.push(`Milestone ${i + 1} removed: ${was.title}.`)
    else if (was && m) {
      const parts: string[] = []
      if (was.title !== m.title) parts.push(`now “${m.title}”`)
      if (was.amountCents !== m.amountCents) parts.push(`${dollars(was.amountCents)} → ${dollars(m.amountCents)}`)
      if (was.dueDate !== m.dueDate) parts.push(`due ${was.dueDate} → ${m.dueDate}`)
      if (parts.length) out.push(`Milestone ${i + 1}: ${parts.join(', ')}.`)
    }
  }
  const g = (x: RevisionLike['guarantee']) => (x ? `${x.hp} hp ±${x.tolerancePct} % (${x.standard})` : 'none')
  if (g(before.guarantee) !== g(after.guarantee)) out.push(`Power guarantee: ${g(before.guarantee)} → ${g(after.guarantee)}.`)
  if (before.validUntil !== after.validUntil) out.push(`Valid until ${after.validUntil.slice(0, 10)} (was ${before.validUntil.slice(0, 10)}).`)
  return out
}
