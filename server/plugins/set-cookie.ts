// One Set-Cookie per cookie name in an answer. A signed-in page rendered on the server reads the
// session through Auth.js's /session route, and sidebase nuxt-auth copies that answer's refreshed
// session cookie onto the page twice (once in getSession's onResponse, once in its fetch helper's
// cookie proxy). The last line of each name is the one a browser keeps (RFC 6265, 5.3), so only it stays.
export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('beforeResponse', (event) => {
    const res = event.node.res
    if (res.headersSent) return
    const header = res.getHeader('set-cookie')
    if (!Array.isArray(header) || header.length < 2) return
    const last = new Map<string, string>()
    for (const line of header) {
      const name = line.slice(0, line.indexOf('=')).trim()
      last.delete(name)
      last.set(name, line)
    }
    if (last.size < header.length) res.setHeader('set-cookie', [...last.values()])
  })
})
