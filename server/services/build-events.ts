// The build-changed event: services announce a committed change to a build or its pulls, and the
// plugins that keep derived state in step (the search index, the public answer cache) listen.

type BuildListener = (buildId: number) => Promise<unknown>
const listeners: BuildListener[] = []

/** Registers work to run after a build changes (the search plugin keeps the index in step through it). */
export function onBuildChanged(listener: BuildListener): void {
  listeners.push(listener)
}

/**
 * Called after every write that changes a build or its pulls, once the transaction has committed.
 * A listener's failure is logged, never passed on: the write itself has already succeeded.
 */
export async function afterBuildChanged(buildId: number): Promise<void> {
  for (const listener of listeners) {
    try {
      await listener(buildId)
    }
    catch (err) {
      console.error(`after change of build ${buildId}:`, err)
    }
  }
}

/**
 * Keeps the search index in step after an admin changed a build (a verification, a rejection, an
 * unpublish), once the change has committed: the same hook every build write goes through.
 */
export async function reindexBuildAfterAdminChange(buildId: number): Promise<void> {
  await afterBuildChanged(buildId)
}
