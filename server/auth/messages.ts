import { escapeHtml } from '../../shared/text/html'

/** The e-mails of sign-up and sign-in, as plain text with a simple HTML twin. */
export interface MailBody {
  subject: string
  text: string
  html: string
}

export function compose(subject: string, greeting: string, paragraphs: string[], action?: { label: string, url: string }, footer?: string): MailBody {
  const text = [greeting, '', ...paragraphs.flatMap(p => [p, '']), ...(action ? [`${action.label}: ${action.url}`, ''] : []), footer ?? '', '— Torquewright'].join('\n')
  const html = [
    `<p>${escapeHtml(greeting)}</p>`,
    ...paragraphs.map(p => `<p>${escapeHtml(p)}</p>`),
    action ? `<p><a href="${escapeHtml(action.url)}">${escapeHtml(action.label)}</a></p>` : '',
    footer ? `<p><small>${escapeHtml(footer)}</small></p>` : '',
    '<p>— Torquewright</p>',
  ].join('\n')
  return { subject, text, html }
}

const IGNORE = 'If you did not ask for this, ignore this e-mail: nothing changes until the link is used.'

export const emails = {
  verify: (name: string, url: string): MailBody => compose(
    'Confirm your e-mail for Torquewright',
    `Hello ${name},`,
    ['Confirm this address to finish setting up your Torquewright account. The link works once, for 24 hours, and signs you in.'],
    { label: 'Confirm my e-mail', url },
    IGNORE,
  ),
  signInLink: (name: string, url: string): MailBody => compose(
    'Your Torquewright sign-in link',
    `Hello ${name},`,
    ['Here is the sign-in link you asked for. It works once, for 20 minutes.'],
    { label: 'Sign in to Torquewright', url },
    IGNORE,
  ),
  alreadyRegistered: (name: string, signInUrl: string): MailBody => compose(
    'You already have a Torquewright account',
    `Hello ${name},`,
    ['Someone, probably you, tried to sign up with this e-mail address, which already has an account. No second account was made.',
      'If you forgot your password, ask for an e-mailed sign-in link on the sign-in page, then set a new password on your account page.'],
    { label: 'Go to sign-in', url: signInUrl },
  ),
  changeEmail: (name: string, url: string): MailBody => compose(
    'Confirm your new e-mail for Torquewright',
    `Hello ${name},`,
    ['Confirm that your Torquewright account should use this address from now on. The link works once, for an hour, and signs you in.'],
    { label: 'Use this address', url },
    IGNORE,
  ),
  emailInUse: (signInUrl: string): MailBody => compose(
    'A Torquewright account wanted this address',
    'Hello,',
    ['Someone asked to move another Torquewright account to this e-mail address, which already has an account of its own. Nothing was changed.'],
    { label: 'Go to sign-in', url: signInUrl },
  ),
  signInPaused: (name: string, signInUrl: string): MailBody => compose(
    'Password sign-in to your Torquewright account is paused',
    `Hello ${name},`,
    ['Many wrong passwords for your account arrived from different places within the last hour, so sign-in by password is paused for now. Nobody signed in with them. Password sign-in comes back by itself within the hour after the wrong attempts stop.',
      'An e-mailed sign-in link still works meanwhile: ask for one on the sign-in page. If the wrong passwords were not yours, consider setting a new, longer password once signed in.'],
    { label: 'Sign in with an e-mailed link', url: signInUrl },
  ),
  emailChanged: (name: string, newEmail: string): MailBody => compose(
    'Your Torquewright e-mail address was changed',
    `Hello ${name},`,
    [`Your account now signs in with ${newEmail}. If you did not make this change, reply to this e-mail at once.`],
  ),
}
