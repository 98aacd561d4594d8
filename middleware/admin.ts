/** Pages for admins only (accounts). */
export default defineNuxtRouteMiddleware(to => pageAccess(to, ['admin']))
