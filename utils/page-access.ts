import type { RouteLocationNormalized } from 'vue-router'
import type { Role } from '#shared/domain'

const FOR: Record<Role, string> = { racer: 'racer accounts', builder: 'shop (builder) accounts', admin: 'admins' }

/**
 * The route middlewares' one check: anonymous visitors go to sign-in (and come back after), a
 * signed-in user of another role is refused with a 403 page. Display only: every API route checks again.
 */
export function pageAccess(to: RouteLocationNormalized, roles?: Role[]) {
  const user = useSessionUser()
  if (!user.value) return navigateTo({ path: '/sign-in', query: { next: to.fullPath } })
  if (roles && !roles.includes(user.value.role)) {
    const allowed = roles.map(r => FOR[r]).join(' and ')
    return abortNavigation(createError({
      status: 403,
      message: `This page is for ${allowed}. You are signed in as a ${user.value.role}.`,
    }))
  }
}
