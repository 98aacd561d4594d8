/**
 * Keeps the scripts of lazily hydrated components (`<LazyFoo hydrate-on-… />`) out of a page's
 * modulepreload links, so the browser fetches them when they hydrate, not with the first load.
 * Nuxt's renderer drops those modules from the request's module set after it has worked out the
 * stylesheets, but Nuxt 4.4.5's resource hints reuse the dependency list cached by that first look
 * (later Nuxt releases recompute it). With the cache off for the request, the stylesheets still count
 * every rendered component and the preload links only the ones that hydrate at once.
 */
export default defineNuxtPlugin((nuxtApp) => {
  nuxtApp.hook('app:rendered', ({ ssrContext }) => {
    if (!ssrContext) return
    Object.defineProperty(ssrContext, '_requestDependencies', { configurable: true, get: () => undefined, set: () => {} })
  })
})
