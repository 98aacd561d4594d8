// What Torquewright adds to Auth.js's user and token types (module augmentation).
import type { Role } from '../domain'
import type { UnitSystem } from '../schemas/auth'

declare module '@auth/core/types' {
  interface User {
    role?: Role
    units?: UnitSystem
    sessionVersion?: number
  }
}

declare module '@auth/core/jwt' {
  interface JWT {
    role?: Role
    units?: UnitSystem
    /** How the session began: 'password' or 'link' (the provider id). */
    method?: string
    /** When the session began (ms since the epoch). */
    authAt?: number
    /** The account's session version when the cookie was issued; a raised version revokes it. */
    sv?: number
  }
}
