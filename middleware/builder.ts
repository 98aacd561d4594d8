/** Pages for shops only (the shop dashboard). */
export default defineNuxtRouteMiddleware(to => pageAccess(to, ['builder']))
