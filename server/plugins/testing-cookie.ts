// Test mode only (TW_TEST_MODE=1): a page request with `x-test-set-cookie` gets a cookie on its answer,
// so the tests can show that the page cache (server/plugins/page-cache.ts) never stores such an answer.
export default defineNitroPlugin((nitroApp) => {
  if (process.env.TW_TEST_MODE !== '1') return
  nitroApp.hooks.hook('render:response', (_response, { event }) => {
    if (getRequestHeader(event, 'x-test-set-cookie')) appendResponseHeader(event, 'set-cookie', 'tw_test=1; Path=/; SameSite=Lax; HttpOnly')
  })
})
