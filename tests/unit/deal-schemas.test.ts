import { describe, expect, it } from 'vitest'
import { milestoneStates, quoteRequests, transmissions } from '../../server/database/schema'
import { ASPIRATIONS as DEAL_ASPIRATIONS, FUELS as DEAL_FUELS, USES as DEAL_USES } from '../../shared/domain'
import { MILESTONE_STATES, TRANSMISSIONS } from '../../shared/deals/constants'
import { MAX_CENTS } from '../../shared/money'
import { QUOTE_LIMIT_MESSAGE, messageSchema, quoteFieldsSchema, quoteRequestSchema, quoteSchema } from '../../shared/schemas/deals'

// The database columns' own enum values, as drizzle holds them.
const { fuel: { enumValues: fuels }, aspiration: { enumValues: aspirations }, intendedUse: { enumValues: uses } } = quoteRequests

const request = {
  shop: 'harrow-creek-engine-works', title: 'Bracket engine', targetHp: 640, targetStandard: 'SAE_J1349_2004',
  fuel: 'race_gas', aspiration: 'na', intendedUse: 'drag', transmission: 'automatic', stallRpm: 4800, shiftRpm: 7200,
  budgetMinCents: 2_000_000, budgetMaxCents: 3_000_000,
}

const issues = (result: { success: boolean, error?: { issues: { path: PropertyKey[], message: string }[] } }) =>
  (result.error?.issues ?? []).map(i => `${i.path.join('.')}: ${i.message}`)

describe('the deal forms\' schemas', () => {
  it('use the same words as the database columns', () => {
    expect([...DEAL_FUELS]).toEqual([...fuels])
    expect([...DEAL_ASPIRATIONS]).toEqual([...aspirations])
    expect([...DEAL_USES]).toEqual([...uses])
    expect([...TRANSMISSIONS]).toEqual([...transmissions])
    expect([...MILESTONE_STATES]).toEqual([...milestoneStates])
  })

  it('take a complete quote request and fill the optional fields', () => {
    const parsed = quoteRequestSchema.parse(request)
    expect(parsed.targetTq).toBeNull()
    expect(parsed.attachmentIds).toEqual([])
    expect(parsed.notes).toBe('')
  })

  it.each([
    [{ stallRpm: null }, 'stallRpm: With an automatic, give the converter stall speed'],
    [{ transmission: 'manual' }, 'stallRpm: A stall speed applies to an automatic only'],
    [{ shiftRpm: 4500 }, 'shiftRpm: The shift rpm must be above the stall speed'],
    [{ budgetMaxCents: 1_000_000 }, 'budgetMaxCents: The top of the budget is below its bottom'],
    [{ targetStandard: 'FLATTERING' }, 'targetStandard: Pick one of the correction standards in the list'],
    [{ budgetMinCents: 10.5 }, 'budgetMinCents: An amount is a whole number of cents'],
    [{ deadline: '2026-02-30' }, 'deadline: That date does not exist'],
    [{ launchRpm: 3800 }, 'launchRpm: With an automatic, the converter stall speed is the launch'],
    [{ transmission: 'manual', stallRpm: null, launchRpm: 7400 }, 'shiftRpm: The shift rpm must be above the launch rpm'],
    [{ transmission: 'manual', stallRpm: null, launchRpm: 900 }, 'launchRpm: The launch rpm is at least 1,000'],
  ])('refuses %j with a message a person can act on', (change, message) => {
    expect(issues(quoteRequestSchema.safeParse({ ...request, ...change }))).toContain(message)
  })

  it('carries a manual car\'s launch rpm, and leaves it null when not given', () => {
    expect(quoteRequestSchema.parse({ ...request, transmission: 'manual', stallRpm: null, launchRpm: 3800 }).launchRpm).toBe(3800)
    expect(quoteRequestSchema.parse(request).launchRpm).toBeNull()
  })

  it('refuses an empty message without a file', () => {
    expect(issues(messageSchema.safeParse({ body: '   ' }))).toContain('body: Write a message or attach a file')
    expect(messageSchema.safeParse({ body: '', attachmentIds: [3] }).success).toBe(true)
  })

  it('bounds a quote: at least one line and one milestone, whole-cent amounts, a guarantee tolerance of at most 10 %', () => {
    const quote = {
      lineItems: [{ category: 'Machine work', description: 'Bore and hone', quantity: 1, unitPriceCents: 50_000 }],
      milestones: [{ title: 'All', deliverable: 'Everything', amountCents: 50_000, dueDate: '2030-01-01' }],
      validUntil: '2030-01-01',
    }
    expect(quoteSchema.safeParse(quote).success).toBe(true)
    expect(issues(quoteSchema.safeParse({ ...quote, lineItems: [] }))).toContain('lineItems: A quote has at least one line item')
    expect(issues(quoteSchema.safeParse({ ...quote, milestones: [{ ...quote.milestones[0], amountCents: 99 }] }))).toContain('milestones.0.amountCents: A milestone is at least $1.00')
    expect(issues(quoteSchema.safeParse({ ...quote, guarantee: { hp: 700, tolerancePct: 12, standard: 'DIN_70020' } }))).toContain('guarantee.tolerancePct: The tolerance is at most 10 %')
  })

  it('refuses a quote over the money limit up front, with the words the server uses', () => {
    const quote = {
      lineItems: [{ category: 'Machine work', description: 'Bore and hone', quantity: 1, unitPriceCents: 50_000 }],
      milestones: [{ title: 'All', deliverable: 'Everything', amountCents: 50_000, dueDate: '2030-01-01' }],
      validUntil: '2030-01-01',
    }
    expect(QUOTE_LIMIT_MESSAGE).toContain('at most $10,000,000.00')
    const line = quote.lineItems[0]!
    const oneLine = issues(quoteSchema.safeParse({ ...quote, lineItems: [{ ...line, unitPriceCents: MAX_CENTS, quantity: 2 }] }))
    expect(oneLine).toEqual([`lineItems.0.quantity: ${QUOTE_LIMIT_MESSAGE}; this line comes to $20,000,000.00`])
    const twoLines = issues(quoteSchema.safeParse({ ...quote, lineItems: [{ ...line, unitPriceCents: MAX_CENTS }, { ...line, unitPriceCents: 1 }] }))
    expect(twoLines).toEqual([`lineItems: ${QUOTE_LIMIT_MESSAGE}; the line items come to $10,000,000.01`])
    // Exactly at the limit is allowed (the limit is inclusive, as assertCents has it).
    expect(quoteSchema.safeParse({ ...quote, lineItems: [{ ...line, unitPriceCents: MAX_CENTS }], milestones: [{ ...quote.milestones[0]!, amountCents: MAX_CENTS }] }).success).toBe(true)
    // The route reads the fields alone; the limit is the service's 422.
    expect(quoteFieldsSchema.safeParse({ ...quote, lineItems: [{ ...line, unitPriceCents: MAX_CENTS, quantity: 2 }] }).success).toBe(true)
  })
})
