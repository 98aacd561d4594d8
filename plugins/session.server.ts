/**
 * The signed-in user of a server-rendered page, read in process (server/utils/auth.ts `pageSession`:
 * the account afresh, so a revoked session renders signed out) and put into sidebase's session
 * state before its own plugin runs, which then skips its internal request to /api/auth/session.
 * Runs first (`enforce: 'pre'`). The browser keeps using Auth.js's routes as before.
 */
export default defineNuxtPlugin({
  name: 'page-session',
  enforce: 'pre',
  async setup() {
    const { data, loading, lastRefreshedAt } = useAuthState()
    const read = useRequestEvent()?.context.pageSession as (() => Promise<typeof data.value>) | undefined
    if (!read) return
    data.value = await read()
    loading.value = false
    lastRefreshedAt.value = new Date()
  },
})
