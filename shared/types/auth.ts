import type { Role } from '../domain'
import type { UnitSystem } from '../schemas/auth'

/** What a session tells the pages about who is signed in. */
export interface SessionUser {
  id: number
  name: string
  email: string
  role: Role
  units: UnitSystem
}

/** The account page's view of the signed-in user (GET /api/me). */
export interface AccountProfile extends SessionUser {
  emailVerified: boolean
  hasPassword: boolean
  createdAt: string
  shop: { slug: string, shopName: string, region: string, bio: string } | null
}

/** One account as an admin sees it in the accounts list. */
export interface AdminUserRow {
  id: number
  name: string
  email: string
  role: Role
  emailVerified: boolean
  suspended: boolean
  createdAt: string
  shop: { slug: string, shopName: string } | null
}

/** A shop's own build as the shop dashboard lists it, drafts included. */
export interface OwnBuildRow {
  id: number
  slug: string
  title: string
  status: 'draft' | 'published' | 'archived'
  /** Null while a draft lacks its bore, stroke or cylinders. */
  displacementCi: number | null
  peakHp: number | null
  peakTq: number | null
  verified: boolean
  pulls: number
  updatedAt: string
}
