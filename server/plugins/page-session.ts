import { pageSession } from '../utils/auth'

// Hands a page render the reader of its session (plugins/session.server.ts calls it), so the app reads
// the session in process rather than through an internal request to Auth.js's /session route.
export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('request', (event) => {
    if (event.method === 'GET' || event.method === 'HEAD') event.context.pageSession = () => pageSession(event)
  })
})
