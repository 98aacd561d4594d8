import { onBuildChanged } from '../services/build-events'

// Every committed change of a build or its pulls (build writes, evidence decisions, moderation)
// drops the cached public answers before the write's own answer goes out (server/utils/public-cache.ts).
export default defineNitroPlugin(() => {
  onBuildChanged(() => invalidatePublicCache())
})
