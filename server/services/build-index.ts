import type { Database } from '../database/types'

/**
 * Keeps the search index in step after an admin changed a build (a verification, a rejection, an
 * unpublish), once the change has committed. The one call site for the admin's changes: the search
 * work's `syncBuild(db, buildId)` (server/services/search.ts) belongs here once it is on main.
 */
export async function reindexBuildAfterAdminChange(_db: Database, _buildId: number): Promise<void> {}
