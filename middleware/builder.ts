/** Pages for builders only (the shop dashboard). */
export default defineNuxtRouteMiddleware(to => pageAccess(to, ['builder']))
