import { z } from 'zod'

// The pages' CSP forbids eval, and zod 4 probes for it (new Function) when it builds its first object
// schema, which Chromium reports as a CSP violation. Jitless parsing never probes. Set at module level so it
// runs before the page chunks build their schemas (plugins are evaluated before the pages).
z.config({ jitless: true })

export default defineNuxtPlugin(() => {})
