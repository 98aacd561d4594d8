/** Pages for any signed-in user (the account page). */
export default defineNuxtRouteMiddleware(to => pageAccess(to))
