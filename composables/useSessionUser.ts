import type { SessionUser } from '#shared/types/auth'

/** The signed-in user as the session describes them (id, name, e-mail, role, units), or null. For display only: the server decides. */
export function useSessionUser() {
  const { data, status } = useAuth()
  return computed<SessionUser | null>(() => (status.value === 'authenticated' && data.value?.user ? data.value.user as unknown as SessionUser : null))
}
