// Every e-mail of Torquewright in its own words, each as plain text and simple HTML: the account
// mails (sign-up, sign-in links, address changes), an admin's decisions and the deal mails. Each is
// queued in the outbox (services/outbox.ts), which sends it.
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
    | { kind: 'review_written', shopName: string, racerName: string, title: string, rating: number, edited: boolean, excerpt: string, link: string }

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

/** The one layout of every e-mail: paragraphs, an optional button link, the signature and a note under it. */
function layout(paragraphs: string[], action: { label: string, link: string } | null, footer: Footer | null = DEAL_FOOTER): { text: string, html: string } {
  const footerText = !footer ? '' : footer.link ? `${footer.text}\n${footer.link.label}: ${footer.link.href}` : footer.text
  const footerHtml = !footer
    ? ''
    : footer.link
      ? `${escapeHtml(footer.text)} <a href="${escapeHtml(footer.link.href)}" style="color:${INK}">${escapeHtml(footer.link.label)}</a>`
      : escapeHtml(footer.text)
  const text = [paragraphs.join('\n\n'), ...(action ? [`${action.label}: ${action.link}`] : []), `— Torquewright${footerText ? `\n${footerText}` : ''}`].join('\n\n')
  const html = `<!doctype html><html><body style="margin:0;background:${PAPER};font-family:Manrope,Arial,sans-serif;color:${INK}">
<div style="max-width:560px;margin:0 auto;padding:28px 24px">
<p style="font-weight:800;font-size:18px;margin:0 0 18px">Torquewright</p>
${paragraphs.map(p => `<p style="font-size:15px;line-height:1.55;margin:0 0 14px">${escapeHtml(p)}</p>`).join('\n')}
${action ? `<p style="margin:22px 0"><a href="${escapeHtml(action.link)}" style="background:${COPPER};color:white;padding:10px 18px;border-radius:999px;text-decoration:none;font-weight:700">${escapeHtml(action.label)}</a></p>` : ''}
${footerHtml ? `<p style="font-size:12px;color:${INK};opacity:.6">${footerHtml}</p>` : ''}
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
    case 'review_written':
      return { subject: `${mail.edited ? 'Review edited' : 'New review'}: ${mail.rating} of 5 from ${mail.racerName}`, ...layout([
        `Hello ${mail.shopName},`,
        mail.edited
          ? `${mail.racerName} edited their review of your work on "${mail.title}". It now rates your shop ${mail.rating} of 5:`
          : `${mail.racerName} reviewed your work on "${mail.title}" and rated your shop ${mail.rating} of 5:`,
        `"${mail.excerpt}"`,
        'The review shows on your shop\'s page. You can answer it once, publicly, from the order page.',
      ], { label: 'Read the review', link: mail.link }) }
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

/** An account or admin e-mail: a greeting, paragraphs, an optional link and note, signed. */
export function compose(subject: string, greeting: string, paragraphs: string[], action?: { label: string, url: string }, footer?: string): RenderedMail {
  return { subject, ...layout([greeting, ...paragraphs], action ? { label: action.label, link: action.url } : null, footer ? { text: footer } : null) }
}

const IGNORE = 'If you did not ask for this, ignore this e-mail: nothing changes until the link is used.'

export const emails = {
  verify: (name: string, url: string): RenderedMail => compose(
    'Confirm your e-mail for Torquewright',
    `Hello ${name},`,
    ['Confirm this address to finish setting up your Torquewright account. The link works once, for 24 hours, and signs you in.'],
    { label: 'Confirm my e-mail', url },
    IGNORE,
  ),
  signInLink: (name: string, url: string): RenderedMail => compose(
    'Your Torquewright sign-in link',
    `Hello ${name},`,
    ['Here is the sign-in link you asked for. It works once, for 20 minutes.'],
    { label: 'Sign in to Torquewright', url },
    IGNORE,
  ),
  alreadyRegistered: (name: string, signInUrl: string): RenderedMail => compose(
    'You already have a Torquewright account',
    `Hello ${name},`,
    ['Someone, probably you, tried to sign up with this e-mail address, which already has an account. No second account was made.',
      'If you forgot your password, ask for an e-mailed sign-in link on the sign-in page, then set a new password on your account page.'],
    { label: 'Go to sign-in', url: signInUrl },
  ),
  changeEmail: (name: string, url: string): RenderedMail => compose(
    'Confirm your new e-mail for Torquewright',
    `Hello ${name},`,
    ['Confirm that your Torquewright account should use this address from now on. The link works once, for an hour, and signs you in.'],
    { label: 'Use this address', url },
    IGNORE,
  ),
  emailInUse: (signInUrl: string): RenderedMail => compose(
    'A Torquewright account wanted this address',
    'Hello,',
    ['Someone asked to move another Torquewright account to this e-mail address, which already has an account of its own. Nothing was changed.'],
    { label: 'Go to sign-in', url: signInUrl },
  ),
  signInPaused: (name: string, signInUrl: string): RenderedMail => compose(
    'Password sign-in to your Torquewright account is paused',
    `Hello ${name},`,
    ['Many wrong passwords for your account arrived from different places within the last hour, so sign-in by password is paused for now. Nobody signed in with them. Password sign-in comes back by itself within the hour after the wrong attempts stop.',
      'An e-mailed sign-in link still works meanwhile: ask for one on the sign-in page. If the wrong passwords were not yours, consider setting a new, longer password once signed in.'],
    { label: 'Sign in with an e-mailed link', url: signInUrl },
  ),
  emailChanged: (name: string, newEmail: string): RenderedMail => compose(
    'Your Torquewright e-mail address was changed',
    `Hello ${name},`,
    [`Your account now signs in with ${newEmail}. If you did not make this change, reply to this e-mail at once.`],
  ),
}

/** The e-mails an admin's decision sends, as plain text with a simple HTML twin. */
export const adminEmails = {
  pullRejected: (m: { name: string, pullLabel: string, buildTitle: string, reason: string, dashboardUrl: string }): RenderedMail => compose(
    `Dyno pull ${VERIFICATION.rejected.toLowerCase()}: ${m.pullLabel}`,
    `Hello ${m.name},`,
    [
      `An admin reviewed the pull "${m.pullLabel}" on your build "${m.buildTitle}" and could not verify it as evidence. The reason:`,
      m.reason,
      'The pull no longer counts towards the build. Upload a corrected pull (the raw file from the dyno, with the weather of the day) from your shop dashboard; a new upload runs the automatic checks and awaits verification afresh.',
    ],
    { label: 'Open your shop dashboard', url: m.dashboardUrl },
  ),
  pullVerified: (m: { name: string, pullLabel: string, buildTitle: string, buildUrl: string }): RenderedMail => compose(
    `Dyno pull verified: ${m.pullLabel}`,
    `Hello ${m.name},`,
    [
      `An admin compared the pull "${m.pullLabel}" on your build "${m.buildTitle}" with its raw file, weather and correction standard, and verified it.`,
      'The build carries the verified mark, and its figures now count in search and in your shop\'s record. Racers who saved a search this build matches are told about it.',
    ],
    { label: 'Open the build', url: m.buildUrl },
  ),
  buildUnpublished: (m: { name: string, buildTitle: string, reason: string, dashboardUrl: string }): RenderedMail => compose(
    `Your build was taken down: ${m.buildTitle}`,
    `Hello ${m.name},`,
    [
      `We took your build "${m.buildTitle}" off the public site. The reason:`,
      m.reason,
      'It is a draft again and nothing in it was deleted. Put right what the reason says, then publish it again from your shop dashboard.',
    ],
    { label: 'Open your shop dashboard', url: m.dashboardUrl },
  ),
}
