import { config } from 'zod/v4/core'

// The pages' CSP forbids eval, and zod 4 probes for it (new Function) when it builds its first object
// schema, which Chromium reports as a CSP violation. Jitless parsing never probes. Set at module level so it
// runs before the page chunks build their schemas (plugins are evaluated before the pages). zod's core holds
// the one global config every zod build reads; importing it alone keeps zod itself out of the entry chunk.
config({ jitless: true })

export default defineNuxtPlugin(() => {})
