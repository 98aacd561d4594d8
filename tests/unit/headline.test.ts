import { describe, expect, it } from 'vitest'
import { failsItsChecks, headlinePull, type HeadlineCandidate } from '../../shared/pulls/headline'

const pass = [{ outcome: 'pass' }, { outcome: 'warn' }]
const fail = [{ outcome: 'pass' }, { outcome: 'fail' }]
const pull = (id: number, status: HeadlineCandidate['status'], peakHp: number, checks: HeadlineCandidate['checks'] = pass): HeadlineCandidate =>
  ({ id, status, summary: { peakHp }, checks })

// The product's rule (README "Search" and shared/pulls/headline.ts): every combination of a stronger and a
// weaker pull over the three states and a passing or failing report, with the pull expected to speak.
const statuses = ['verified', 'submitted', 'rejected'] as const
const reports = [['pass', pass], ['fail', fail]] as const

function expected(a: HeadlineCandidate, b: HeadlineCandidate): { id: number, basis: string } | null {
  // Written out by hand from the rule's three steps, independently of the implementation's loop.
  const verified = [a, b].filter(p => p.status === 'verified').sort((x, y) => y.summary.peakHp - x.summary.peakHp || x.id - y.id)
  if (verified.length) return { id: verified[0]!.id, basis: 'verified' }
  const awaiting = [a, b].filter(p => p.status === 'submitted' && !p.checks!.some(c => c.outcome === 'fail')).sort((x, y) => y.summary.peakHp - x.summary.peakHp || x.id - y.id)
  return awaiting.length ? { id: awaiting[0]!.id, basis: 'awaiting' } : null
}

describe('the headline rule', () => {
  const cases: [string, HeadlineCandidate, HeadlineCandidate][] = []
  for (const sa of statuses) {
    for (const [ra, ca] of reports) {
      for (const sb of statuses) {
        for (const [rb, cb] of reports) cases.push([`741 hp ${sa}/${ra} beside 685 hp ${sb}/${rb}`, pull(1, sa, 741, ca), pull(2, sb, 685, cb)])
      }
    }
  }

  it.each(cases)('%s', (_name, strong, weak) => {
    const got = headlinePull([strong, weak])
    const want = expected(strong, weak)
    expect(got ? { id: got.pull.id, basis: got.basis } : null).toEqual(want)
  })

  it('never lets a pull that fails its own checks speak, even when it is the strongest and nothing else is verified', () => {
    // An inflated power column: pull B's is inflated (741 hp, the agreement check fails); pull A passes at 685 hp.
    expect(headlinePull([pull(1, 'submitted', 685), pull(2, 'submitted', 741, fail)])).toEqual({ pull: pull(1, 'submitted', 685), basis: 'awaiting' })
    expect(headlinePull([pull(2, 'submitted', 741, fail)])).toBeNull()
  })

  it('prefers any verified pull to a stronger one awaiting verification', () => {
    expect(headlinePull([pull(1, 'submitted', 800), pull(2, 'verified', 600)])!.pull.id).toBe(2)
  })

  it('breaks a tie by the earlier pull, and reads a missing report as no failure', () => {
    expect(headlinePull([pull(5, 'verified', 700), pull(3, 'verified', 700)])!.pull.id).toBe(3)
    expect(headlinePull([pull(1, 'submitted', 650, null)])!.basis).toBe('awaiting')
    expect(failsItsChecks({ checks: null })).toBe(false)
  })

  it('has nothing to say for no pulls or only rejected ones', () => {
    expect(headlinePull([])).toBeNull()
    expect(headlinePull([pull(1, 'rejected', 700)])).toBeNull()
  })
})
