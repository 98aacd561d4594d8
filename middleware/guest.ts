/** Sign-in and sign-up: a signed-in user goes to their role's home instead. */
export default defineNuxtRouteMiddleware(() => {
  const user = useSessionUser()
  if (user.value) return navigateTo(ROLE_HOME[user.value.role])
})
