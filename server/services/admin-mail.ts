import { VERIFICATION } from '#shared/vocabulary'
import { compose, type MailBody } from '../auth/messages'

/** The e-mails an admin's decision sends, as plain text with a simple HTML twin. */
export const adminEmails = {
  pullRejected: (m: { name: string, pullLabel: string, buildTitle: string, reason: string, dashboardUrl: string }): MailBody => compose(
    `Dyno pull ${VERIFICATION.rejected.toLowerCase()}: ${m.pullLabel}`,
    `Hello ${m.name},`,
    [
      `An admin reviewed the pull "${m.pullLabel}" on your listing "${m.buildTitle}" and could not verify it as evidence. The reason:`,
      m.reason,
      'The pull no longer counts towards the listing. Upload a corrected pull (the raw file from the dyno, with the weather of the day) from your shop dashboard; a new upload runs the automatic checks and awaits verification afresh.',
    ],
    { label: 'Open your shop dashboard', url: m.dashboardUrl },
  ),
  pullVerified: (m: { name: string, pullLabel: string, buildTitle: string, buildUrl: string }): MailBody => compose(
    `Dyno pull verified: ${m.pullLabel}`,
    `Hello ${m.name},`,
    [
      `An admin compared the pull "${m.pullLabel}" on your listing "${m.buildTitle}" with its raw file, weather and correction standard, and verified it.`,
      'The listing carries the verified mark, and its figures now count in search and in your shop\'s record. Racers who saved a search this build matches are told about it.',
    ],
    { label: 'Open the listing', url: m.buildUrl },
  ),
  listingUnpublished: (m: { name: string, buildTitle: string, reason: string, dashboardUrl: string }): MailBody => compose(
    `Your listing was taken down: ${m.buildTitle}`,
    `Hello ${m.name},`,
    [
      `We took your listing "${m.buildTitle}" off the public site. The reason:`,
      m.reason,
      'It is a draft again and nothing in it was deleted. Put right what the reason says, then publish it again from your shop dashboard.',
    ],
    { label: 'Open your shop dashboard', url: m.dashboardUrl },
  ),
}
