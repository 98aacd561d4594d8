/** Sign-in and sign-up: a signed-in user goes where the link meant (`next`, a path on this site) or to their role's home. */
export default defineNuxtRouteMiddleware((to) => {
  const user = useSessionUser()
  if (user.value) return navigateTo(safeNextPath(to.query.next) ?? ROLE_HOME[user.value.role])
})
