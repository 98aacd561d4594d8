import type { Role } from '#shared/domain'

export type SignInResult = { ok: true } | { ok: false, code: string }

/** Where each role lands after signing in, unless a page sent them to sign in first. */
export const ROLE_HOME: Record<Role, string> = { racer: '/', builder: '/dashboard', admin: '/admin' }

/**
 * Sign-in and sign-out through Auth.js (sidebase's `authjs` client keeps the session state).
 * Sign-in posts to the provider's callback itself so that the refusal code (rate-limited,
 * unverified, …) reaches the form; sidebase's signIn keeps only the error type.
 */
export function useAccountAuth() {
  const { getCsrfToken, getSession, signOut } = useAuth()

  async function signInWith(provider: 'password' | 'link', fields: Record<string, string>): Promise<SignInResult> {
    const csrfToken = await getCsrfToken()
    const body = new URLSearchParams({ ...fields, csrfToken, callbackUrl: `${window.location.origin}/`, json: 'true' })
    const res = await $fetch<{ url: string }>(`/api/auth/callback/${provider}`, {
      method: 'POST',
      headers: { 'content-type': 'application/x-www-form-urlencoded' },
      body: body.toString(),
    })
    const url = new URL(res.url, window.location.origin)
    const error = url.searchParams.get('error')
    if (error) return { ok: false, code: url.searchParams.get('code') ?? error }
    await getSession()
    return { ok: true }
  }

  async function signOutHere() {
    await signOut({ redirect: false })
    await navigateTo('/sign-in?signedOut=1')
  }

  return { signInWith, signOut: signOutHere }
}

/** What the sign-in forms say for each refusal code. None says whether an e-mail is registered. */
export const SIGN_IN_MESSAGES: Record<string, string> = {
  invalid: 'That e-mail and password do not match an account we can sign in. Check both, or e-mail yourself a sign-in link below.',
  rate_limited: 'Too many attempts for now. Wait a few minutes, or e-mail yourself a sign-in link below.',
  unverified: 'Confirm your e-mail address first: we have just sent a fresh confirmation link to it.',
  suspended: 'This account is suspended, so it cannot sign in. Write to the Torquewright team if you think this is a mistake.',
  link_invalid: 'This link has expired or was already used. Ask for a new one below.',
  email_taken: 'Another account took that e-mail address in the meantime, so yours was not moved.',
  Configuration: 'Sign-in is not available right now. Try again in a minute.',
  MissingCSRF: 'The page was open too long. Reload it and try again.',
}

export function signInMessage(code: string): string {
  return SIGN_IN_MESSAGES[code] ?? SIGN_IN_MESSAGES.Configuration!
}
