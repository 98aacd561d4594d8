// What a person reads for each deal event (the order page's history and the notifications page), and the
// groups of deal e-mail a person may switch off. Pure: both the pages and the server import it.

/** The words for each deal event's action (server/services/deal-context.ts `recordDealEvent`). */
export const DEAL_EVENT_WORDS: Record<string, string> = {
  request_sent: 'Request sent', quote_sent: 'Quote sent', quote_declined: 'Quote declined', quote_accepted: 'Quote accepted',
  milestone_funded: 'Deposit paid', milestone_submitted: 'Work submitted', milestone_approved: 'Approved',
  milestone_auto_approved: 'Approved on its own', milestone_released: 'Paid out to the shop', milestone_disputed: 'Disputed',
  dispute_settled: 'Dispute settled', milestone_refunded: 'Refunded', payment_refunded: 'Late payment refunded',
  order_cancelled: 'Order cancelled', order_completed: 'Order completed', delivery_pull: 'Delivery pull checked',
  change_order_sent: 'Change order sent', change_order_accepted: 'Change order accepted', change_order_declined: 'Change order declined',
  review_posted: 'Review posted', review_edited: 'Review edited',
}

/** An event's words; an action without words shows as stored rather than vanish. */
export const dealEventWords = (action: string): string => DEAL_EVENT_WORDS[action] ?? action

/** The groups of deal e-mail that can be switched off, in the order the page lists them. */
export const EMAIL_GROUPS = ['requests', 'messages', 'quotes', 'payments', 'milestones', 'reviews'] as const
export type EmailGroup = typeof EMAIL_GROUPS[number]

/** What each switch says; `shopsOnly` for mail only a shop receives (a racer is never sent it). */
export const EMAIL_GROUP_LABELS: Record<EmailGroup, { label: string, hint: string, shopsOnly?: true }> = {
  requests: { label: 'New requests', hint: 'A racer asks your shop for a quote.', shopsOnly: true },
  messages: { label: 'Messages', hint: 'The other side writes in a deal’s thread.' },
  quotes: { label: 'Quotes and change orders', hint: 'A quote or a change order is sent to you, or yours is answered.' },
  payments: { label: 'Deposits and payouts', hint: 'A milestone’s deposit is paid, or a payout goes to the shop.' },
  milestones: { label: 'Work submitted and approved', hint: 'The shop submits a milestone, or it is approved.' },
  reviews: { label: 'Reviews of your shop', hint: 'A racer reviews your shop after an order, or edits their review.', shopsOnly: true },
}

/** Mail that always goes out, whatever the switches: it concerns money already paid. */
export const ALWAYS_ON_NOTE = 'Refunds and dispute settlements are always e-mailed: they concern money you have paid or are owed.'

/** The page's default and largest page of notifications. */
export const NOTIFICATIONS_PER_PAGE = 20
