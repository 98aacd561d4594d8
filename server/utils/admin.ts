import type { H3Event } from 'h3'
import type { Database } from '../database/types'

/** What an admin decision needs besides the database: where links in e-mails point. */
export interface AdminContext {
  db: Database
  siteUrl: string
}

/** The database and the site's address for links in e-mails, for an admin decision. */
export function adminContext(event: H3Event): AdminContext {
  return { db: useDb(), siteUrl: siteOrigin(event) }
}
