import type { H3Event } from 'h3'
import type { AdminContext } from '../services/admin-decisions'

/** The database and the site's address for links in e-mails, for an admin decision. */
export function adminContext(event: H3Event): AdminContext {
  return { db: useDb(), siteUrl: siteOrigin(event) }
}
