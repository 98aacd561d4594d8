import { describe, expect, it } from 'vitest'
import { revisionChanges, type RevisionLike } from '../../shared/deals/revision-diff'

const base: RevisionLike = {
  totalCents: 1_800_000,
  validUntil: '2027-01-10',
  guarantee: null,
  lineItems: [
    { category: 'Machine work', description: 'Bore and hone', quantity: 1, unitPriceCents: 480_000, lineTotalCents: 480_000 },
    { category: 'Rotating assembly', description: 'Forged crank', quantity: 1, unitPriceCents: 920_000, lineTotalCents: 920_000 },
    { category: 'Assembly', description: 'Assembly and dyno', quantity: 1, unitPriceCents: 400_000, lineTotalCents: 400_000 },
  ],
  milestones: [
    { position: 0, title: 'Deposit', amountCents: 540_000, dueDate: '2027-01-20' },
    { position: 1, title: 'Delivery', amountCents: 1_260_000, dueDate: '2027-04-01' },
  ],
}

describe('what changed between two quote revisions', () => {
  it('says nothing changed when nothing did', () => {
    expect(revisionChanges(base, structuredClone(base))).toEqual([])
  })

  it('names the total, a changed, an added and a removed line, a moved milestone and the guarantee', () => {
    const next: RevisionLike = structuredClone(base)
    next.lineItems[0]!.lineTotalCents = 500_000
    next.lineItems.splice(1, 1)
    next.lineItems.push({ category: 'Heads', description: 'CNC ported heads', quantity: 1, unitPriceCents: 300_000, lineTotalCents: 300_000 })
    next.totalCents = 1_200_000
    next.milestones[1]!.dueDate = '2027-04-15'
    next.guarantee = { hp: 640, tolerancePct: 3, standard: 'SAE J1349' }
    expect(revisionChanges(base, next)).toEqual([
      'Total $18,000.00 → $12,000.00 (−$6,000.00).',
      'Line changed: Bore and hone, $4,800.00 → $5,000.00.',
      'Line added: CNC ported heads ($3,000.00).',
      'Line removed: Forged crank ($9,200.00).',
      'Milestone 2: due 2027-04-01 → 2027-04-15.',
      'Power guarantee: none → 640 hp ±3 % (SAE J1349).',
    ])
  })
})
