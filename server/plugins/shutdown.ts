// Closes the database pool when Nitro shuts down, so a stopped server leaves no open connections.
export default defineNitroPlugin((nitroApp) => {
  nitroApp.hooks.hook('close', async () => {
    await closeDb()
  })
})
