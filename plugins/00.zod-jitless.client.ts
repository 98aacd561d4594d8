import { setZodJitless } from '~/utils/zod-jitless'

// The pages' CSP forbids eval, and zod 4 probes for it (new Function) when it builds its first object
// schema, which Chromium reports as a CSP violation. Jitless parsing never probes. Set at module level so it
// runs before the page chunks build their schemas (plugins are evaluated before the pages), and without
// importing zod, so zod stays out of the entry chunk and loads only with the pages that validate.
setZodJitless()

export default defineNuxtPlugin(() => {})
