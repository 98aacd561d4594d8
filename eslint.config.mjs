import withNuxt from './.nuxt/eslint.config.mjs'

export default withNuxt({
  ignores: ['.data/**', 'server/database/migrations/**'],
})
