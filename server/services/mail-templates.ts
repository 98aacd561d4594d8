// The deal e-mails, in Torquewright's own words, each as plain text and simple HTML.
import { formatCents } from '../../shared/money'
import { VERIFICATION } from '../../shared/vocabulary'
import { escapeHtml } from '../../shared/text/html'

export interface RenderedMail {
  subject: string
  text: string
  html: string
}

export type DealMail
  = | { kind: 'new_request', shopName: string, racerName: string, title: string, link: string }
    | { kind: 'new_message', recipientName: string, senderName: string, title: string, excerpt: string, link: string }
    | { kind: 'quote_sent', racerName: string, shopName: string, title: string, totalCents: number, revision: number, validUntil: string, link: string }
    | { kind: 'quote_accepted', shopName: string, racerName: string, title: string, totalCents: number, link: string }
    | { kind: 'milestone_funded', recipientName: string, milestone: string, amountCents: number, title: string, link: string }
    | { kind: 'milestone_submitted', racerName: string, shopName: string, milestone: string, autoApproveDays: number, link: string }
    | { kind: 'milestone_approved', recipientName: string, milestone: string, automatic: boolean, link: string }
    | { kind: 'milestone_released', shopName: string, milestone: string, payoutCents: number, feeCents: number, link: string }
    | { kind: 'milestone_refunded', recipientName: string, milestone: string, amountCents: number, reason: string, link: string }
    | { kind: 'change_order_sent', racerName: string, shopName: string, title: string, totalCents: number, milestones: number, link: string }
    | { kind: 'change_order_answered', shopName: string, racerName: string, title: string, totalCents: number, accepted: boolean, link: string }
    | { kind: 'dispute_settled', recipientName: string, side: 'racer' | 'builder', shopName: string, title: string, milestone: string, outcome: 'refund' | 'release', amountCents: number, note: string, link: string }

// The tokens of tailwind.config.ts (ink, paper, copper), written out because e-mail has no stylesheet.
const INK = '#1d2230'
const PAPER = '#f5f3ee'
const COPPER = '#a0461f'

const DEAL_FOOTER = { text: 'You get this e-mail because you are a party to this deal.' }

/** The note under the signature: why the reader gets this mail, with a link where they can change it. */
interface Footer {
  text: string
  link?: { label: string, href: string }
}

function layout(paragraphs: string[], action: { label: string, link: string }, footer: Footer = DEAL_FOOTER): { text: string, html: string } {
  const footerText = footer.link ? `${footer.text}\n${footer.link.label}: ${footer.link.href}` : footer.text
  const footerHtml = footer.link
    ? `${escapeHtml(footer.text)} <a href="${escapeHtml(footer.link.href)}" style="color:${INK}">${escapeHtml(footer.link.label)}</a>`
    : escapeHtml(footer.text)
  const text = `${paragraphs.join('\n\n')}\n\n${action.label}: ${action.link}\n\n— Torquewright\n${footerText}`
  const html = `<!doctype html><html><body style="margin:0;background:${PAPER};font-family:Manrope,Arial,sans-serif;color:${INK}">
<div style="max-width:560px;margin:0 auto;padding:28px 24px">
<p style="font-weight:800;font-size:18px;margin:0 0 18px">Torquewright</p>
${paragraphs.map(p => `<p style="font-size:15px;line-height:1.55;margin:0 0 14px">${escapeHtml(p)}</p>`).join('\n')}
<p style="margin:22px 0"><a href="${escapeHtml(action.link)}" style="background:${COPPER};color:white;padding:10px 18px;border-radius:999px;text-decoration:none;font-weight:700">${escapeHtml(action.label)}</a></p>
<p style="font-size:12px;color:${INK};opacity:.6">${footerHtml}</p>
</div></body></html>`
  return { text, html }
}

function settledOutcome(mail: Extract<DealMail, { kind: 'dispute_settled' }>): string {
  const amount = formatCents(mail.amountCents)
  if (mail.outcome === 'refund') {
    return mail.side === 'racer'
      ? `The deposit of ${amount} is refunded to the card it was paid with; card refunds usually take a few business days to appear.`
      : `The deposit of ${amount} goes back to the racer; it will not be paid out for this milestone.`
  }
  return mail.side === 'racer'
    ? `The deposit of ${amount} is released to ${mail.shopName}.`
    : `The deposit of ${amount} is released to you; the payout, less the platform fee, follows in a separate e-mail.`
}

export function renderDealMail(mail: DealMail): RenderedMail {
  switch (mail.kind) {
    case 'new_request':
      return { subject: `New quote request: ${mail.title}`, ...layout([
        `Hello ${mail.shopName},`,
        `${mail.racerName} asked you for a quote: "${mail.title}". The request has their power target, class limits, fuel, drivetrain, budget and deadline.`,
        'Answer with a quote or a question in the request\'s thread.',
      ], { label: 'Open the request', link: mail.link }) }
    case 'new_message':
      return { subject: `New message on "${mail.title}"`, ...layout([
        `Hello ${mail.recipientName},`,
        `${mail.senderName} wrote: "${mail.excerpt}"`,
      ], { label: 'Reply in the thread', link: mail.link }) }
    case 'quote_sent':
      return { subject: `${mail.shopName} sent a quote: ${formatCents(mail.totalCents)}`, ...layout([
        `Hello ${mail.racerName},`,
        `${mail.shopName} quoted "${mail.title}" at ${formatCents(mail.totalCents)}${mail.revision > 1 ? ` (revision ${mail.revision})` : ''}. The quote holds until ${mail.validUntil}.`,
        'Check the line items and the milestones, then accept or decline it on the request page.',
      ], { label: 'Review the quote', link: mail.link }) }
    case 'quote_accepted':
      return { subject: `Quote accepted: ${mail.title}`, ...layout([
        `Hello ${mail.shopName},`,
        `${mail.racerName} accepted your quote of ${formatCents(mail.totalCents)} for "${mail.title}". An order has been opened; work starts once the first milestone's deposit is in.`,
      ], { label: 'Open the order', link: mail.link }) }
    case 'milestone_funded':
      return { subject: `Deposit received: ${mail.milestone}`, ...layout([
        `Hello ${mail.recipientName},`,
        `The deposit of ${formatCents(mail.amountCents)} for "${mail.milestone}" (${mail.title}) has been paid. Torquewright holds it until the milestone is approved.`,
      ], { label: 'Open the order', link: mail.link }) }
    case 'milestone_submitted':
      return { subject: `Work submitted for approval: ${mail.milestone}`, ...layout([
        `Hello ${mail.racerName},`,
        `${mail.shopName} marked "${mail.milestone}" as done and sent their proof. Look it over and approve it, or open a dispute if something is wrong.`,
        `If you do nothing, it is approved on its own after ${mail.autoApproveDays} days.`,
      ], { label: 'Review the work', link: mail.link }) }
    case 'milestone_approved':
      return { subject: `Milestone approved: ${mail.milestone}`, ...layout([
        `Hello ${mail.recipientName},`,
        mail.automatic
          ? `"${mail.milestone}" was approved on its own, as the racer did not answer within the approval period.`
          : `"${mail.milestone}" was approved. The payout to the shop follows.`,
      ], { label: 'Open the order', link: mail.link }) }
    case 'milestone_released':
      return { subject: `Payout sent: ${mail.milestone}`, ...layout([
        `Hello ${mail.shopName},`,
        `${formatCents(mail.payoutCents)} for "${mail.milestone}" has been transferred to your payout account (the platform fee of ${formatCents(mail.feeCents)} is deducted).`,
      ], { label: 'Open the order', link: mail.link }) }
    case 'milestone_refunded':
      return { subject: `Refunded: ${mail.milestone}`, ...layout([
        `Hello ${mail.recipientName},`,
        `The deposit of ${formatCents(mail.amountCents)} for "${mail.milestone}" has been refunded to the card it was paid with. ${mail.reason}`,
        'Card refunds usually take a few business days to appear.',
      ], { label: 'Open the order', link: mail.link }) }
    case 'dispute_settled':
      return { subject: `Dispute settled: ${mail.milestone} ${mail.outcome === 'refund' ? 'refunded to the racer' : 'released to the shop'}`, ...layout([
        `Hello ${mail.recipientName},`,
        `Torquewright has looked at the dispute over "${mail.milestone}" (${mail.title}) and settled it.`,
        settledOutcome(mail),
        `The note from Torquewright: "${mail.note}"`,
        'The decision is final for this milestone. The rest of the order carries on as agreed; write in the deal\'s thread if something between you is still open.',
      ], { label: 'Open the order', link: mail.link }) }
    case 'change_order_sent':
      return { subject: `Change order: ${mail.title}`, ...layout([
        `Hello ${mail.racerName},`,
        `${mail.shopName} proposes a new plan for the rest of "${mail.title}": ${formatCents(mail.totalCents)} in ${mail.milestones} milestone${mail.milestones === 1 ? '' : 's'}, in place of the milestones still waiting for a deposit.`,
        'Nothing you have paid changes. Accept or decline it on the order page.',
      ], { label: 'Review the change order', link: mail.link }) }
    case 'change_order_answered':
      return { subject: `Change order ${mail.accepted ? 'accepted' : 'declined'}: ${mail.title}`, ...layout([
        `Hello ${mail.shopName},`,
        mail.accepted
          ? `${mail.racerName} accepted your change order of ${formatCents(mail.totalCents)} for "${mail.title}". Its milestones now stand in place of the unpaid ones.`
          : `${mail.racerName} declined your change order of ${formatCents(mail.totalCents)} for "${mail.title}". The order stays as it was.`,
      ], { label: 'Open the order', link: mail.link }) }
  }
}

/** What the saved-search e-mail says about the new build; figures are the search index's (SAE J1349 (2004), recomputed from the raw pull). */
export interface SavedSearchMail {
  recipientName: string
  searchName: string
  buildTitle: string
  shopName: string
  displacementCi: number
  peakHp: number | null
  peakHpRpm: number | null
  buildLink: string
  manageLink: string
}

const figure = (v: number) => v.toLocaleString('en-US', { maximumFractionDigits: 1 })

/** A new verified build that matches a saved search. */
export function renderSavedSearchMail(mail: SavedSearchMail): RenderedMail {
  const litres = (mail.displacementCi * 0.016387064).toFixed(1) // 1 in³ = 16.387064 cm³ (exact by definition of the inch)
  const power = mail.peakHp !== null
    ? `${figure(mail.peakHp)} hp peak${mail.peakHpRpm !== null ? ` at ${mail.peakHpRpm.toLocaleString('en-US')} rpm` : ''} under SAE J1349 (2004), recomputed from the shop's raw dyno pull`
    : 'no peak power on file yet'
  const verified = VERIFICATION.verified.toLowerCase()
  return { subject: `New ${verified} build for "${mail.searchName}": ${mail.buildTitle}`, ...layout([
    `Hello ${mail.recipientName},`,
    `A build that matches your saved search "${mail.searchName}" now carries ${verified} dyno evidence:`,
    `${mail.buildTitle}, by ${mail.shopName}. ${figure(mail.displacementCi)} ci (${litres} L), ${power}.`,
  ], { label: 'See the build', link: mail.buildLink }, {
    text: 'You get this e-mail because you saved this search with e-mail on. Rename it, turn its e-mail off or delete it on your account page.',
    link: { label: 'Manage saved searches', href: mail.manageLink },
  }) }
}
