import type { Database } from '../database/types'
import { afterBuildChanged } from './listing-editor'

/**
 * Keeps the search index in step after an admin changed a build (a verification, a rejection, an
 * unpublish), once the change has committed: the same hook every listing write goes through.
 */
export async function reindexBuildAfterAdminChange(_db: Database, buildId: number): Promise<void> {
  await afterBuildChanged(buildId)
}
