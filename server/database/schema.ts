import { sql } from 'drizzle-orm'
import {
  bigint, char, datetime, decimal, double, index, int, json, mysqlEnum, mysqlTable, text, uniqueIndex, varchar,
} from 'drizzle-orm/mysql-core'
import type { EvidenceCheck } from '../../shared/engine/types'
import type { PullSummaryFigures } from '../../shared/pulls/summary'

/** Shared column shapes, so every table spells them once. */
const id = () => bigint('id', { mode: 'number', unsigned: true }).autoincrement().primaryKey()
const ref = (name: string) => bigint(name, { mode: 'number', unsigned: true })
const createdAt = () => datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`)
const updatedAt = () => datetime('updated_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`).$onUpdate(() => new Date())
const inches = (name: string) => decimal(name, { precision: 7, scale: 4, mode: 'number' })
const cc = (name: string) => decimal(name, { precision: 7, scale: 2, mode: 'number' })
const degrees = (name: string) => decimal(name, { precision: 5, scale: 1, mode: 'number' })
const figure = (name: string) => decimal(name, { precision: 8, scale: 1, mode: 'number' })

export const roles = ['racer', 'builder', 'admin'] as const
export const aspirations = ['na', 'turbo', 'supercharged', 'nitrous'] as const
export const fuels = ['pump_gas', 'race_gas', 'e85', 'methanol'] as const
export const uses = ['drag', 'road_course', 'street_strip', 'off_road', 'marine', 'street'] as const
export const buildStatuses = ['draft', 'published', 'archived'] as const
export const pullStatuses = ['submitted', 'verified', 'rejected'] as const
export const fileKinds = ['pull', 'sheet', 'photo', 'attachment', 'proof'] as const
export const dynoKinds = ['engine', 'chassis'] as const
export const comparisonRoles = ['baseline', 'variant'] as const
export const changeKinds = ['heads', 'intake', 'camshaft', 'exhaust', 'tune', 'other'] as const

export const users = mysqlTable('users', {
  id: id(),
  email: varchar('email', { length: 254 }).notNull(),
  name: varchar('name', { length: 120 }).notNull(),
  passwordHash: varchar('password_hash', { length: 255 }),
  role: mysqlEnum('role', roles).notNull(),
  unitPreference: mysqlEnum('unit_preference', ['imperial', 'metric']).notNull().default('imperial'),
  emailVerifiedAt: datetime('email_verified_at', { mode: 'date', fsp: 3 }),
  suspendedAt: datetime('suspended_at', { mode: 'date', fsp: 3 }),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, t => [uniqueIndex('users_email_unique').on(t.email)])

export const builderProfiles = mysqlTable('builder_profiles', {
  id: id(),
  userId: ref('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  shopName: varchar('shop_name', { length: 120 }).notNull(),
  slug: varchar('slug', { length: 140 }).notNull(),
  region: varchar('region', { length: 80 }).notNull(),
  bio: text('bio').notNull(),
  specialties: json('specialties').$type<string[]>().notNull(),
  capabilities: json('capabilities').$type<string[]>().notNull(),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, t => [
  uniqueIndex('builder_profiles_slug_unique').on(t.slug),
  uniqueIndex('builder_profiles_user_unique').on(t.userId),
])

export const builds = mysqlTable('builds', {
  id: id(),
  builderId: ref('builder_id').notNull().references(() => builderProfiles.id, { onDelete: 'cascade' }),
  slug: varchar('slug', { length: 160 }).notNull(),
  title: varchar('title', { length: 160 }).notNull(),
  summary: text('summary').notNull(),
  engineFamily: varchar('engine_family', { length: 60 }).notNull(),
  cylinders: int('cylinders').notNull(),
  boreIn: inches('bore_in').notNull(),
  strokeIn: inches('stroke_in').notNull(),
  rodLengthIn: inches('rod_length_in').notNull(),
  cylinderHeads: varchar('cylinder_heads', { length: 160 }).notNull(),
  chamberCc: cc('chamber_cc').notNull(),
  pistonCc: cc('piston_cc').notNull(),
  gasketBoreIn: inches('gasket_bore_in').notNull(),
  gasketThicknessIn: inches('gasket_thickness_in').notNull(),
  deckClearanceIn: inches('deck_clearance_in').notNull(),
  camIntakeDurationDeg: degrees('cam_intake_duration_deg').notNull(),
  camExhaustDurationDeg: degrees('cam_exhaust_duration_deg').notNull(),
  camIntakeLiftIn: inches('cam_intake_lift_in').notNull(),
  camExhaustLiftIn: inches('cam_exhaust_lift_in').notNull(),
  camLobeSeparationDeg: degrees('cam_lobe_separation_deg').notNull(),
  camIntakeCenterlineDeg: degrees('cam_intake_centerline_deg').notNull(),
  intakeManifold: varchar('intake_manifold', { length: 160 }).notNull(),
  throttleBody: varchar('throttle_body', { length: 80 }).notNull(),
  injectorSizeLbHr: decimal('injector_size_lb_hr', { precision: 6, scale: 1, mode: 'number' }),
  injectorCount: int('injector_count'),
  fuel: mysqlEnum('fuel', fuels).notNull(),
  aspiration: mysqlEnum('aspiration', aspirations).notNull(),
  engineManagement: varchar('engine_management', { length: 120 }).notNull(),
  intendedUse: mysqlEnum('intended_use', uses).notNull(),
  priceCents: bigint('price_cents', { mode: 'number', unsigned: true }).notNull(),
  status: mysqlEnum('status', buildStatuses).notNull().default('draft'),
  publishedAt: datetime('published_at', { mode: 'date', fsp: 3 }),
  // Denormalised from the verified (or best submitted) pull, under SAE J1349 (2004).
  peakHp: figure('peak_hp'),
  peakHpRpm: int('peak_hp_rpm'),
  peakTq: figure('peak_tq'),
  peakTqRpm: int('peak_tq_rpm'),
  verifiedAt: datetime('verified_at', { mode: 'date', fsp: 3 }),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, t => [
  uniqueIndex('builds_slug_unique').on(t.slug),
  index('builds_builder_idx').on(t.builderId),
  index('builds_status_idx').on(t.status),
])

export const buildParts = mysqlTable('build_parts', {
  id: id(),
  buildId: ref('build_id').notNull().references(() => builds.id, { onDelete: 'cascade' }),
  position: int('position').notNull(),
  category: varchar('category', { length: 60 }).notNull(),
  part: varchar('part', { length: 200 }).notNull(),
  partNumber: varchar('part_number', { length: 80 }).notNull().default(''),
  quantity: int('quantity').notNull(),
  unitPriceCents: bigint('unit_price_cents', { mode: 'number', unsigned: true }).notNull(),
}, t => [index('build_parts_build_idx').on(t.buildId, t.position)])

export const files = mysqlTable('files', {
  id: id(),
  ownerId: ref('owner_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  kind: mysqlEnum('kind', fileKinds).notNull(),
  mime: varchar('mime', { length: 120 }).notNull(),
  sizeBytes: int('size_bytes', { unsigned: true }).notNull(),
  sha256: char('sha256', { length: 64 }).notNull(),
  storageKey: varchar('storage_key', { length: 255 }).notNull(),
  originalName: varchar('original_name', { length: 255 }).notNull(),
  createdAt: createdAt(),
}, t => [
  uniqueIndex('files_storage_key_unique').on(t.storageKey),
  index('files_sha256_idx').on(t.sha256),
])

/** What the server learnt from a pull file (see shared/pulls/summary.ts): enough to list and search without re-parsing. */
export type PullSummary = PullSummaryFigures

export const dynoPulls = mysqlTable('dyno_pulls', {
  id: id(),
  buildId: ref('build_id').notNull().references(() => builds.id, { onDelete: 'cascade' }),
  label: varchar('label', { length: 120 }).notNull(),
  fileId: ref('file_id').notNull().references(() => files.id),
  sheetFileId: ref('sheet_file_id').references(() => files.id),
  dynoKind: mysqlEnum('dyno_kind', dynoKinds).notNull(),
  declaredStandard: varchar('declared_standard', { length: 20 }).notNull(),
  declaredFactor: decimal('declared_factor', { precision: 6, scale: 4, mode: 'number' }),
  baroInHg: decimal('baro_in_hg', { precision: 5, scale: 2, mode: 'number' }),
  airTempF: decimal('air_temp_f', { precision: 5, scale: 1, mode: 'number' }),
  humidityPct: decimal('humidity_pct', { precision: 4, scale: 1, mode: 'number' }),
  declaredPeakHp: figure('declared_peak_hp'),
  declaredPeakHpRpm: int('declared_peak_hp_rpm'),
  declaredPeakTq: figure('declared_peak_tq'),
  declaredPeakTqRpm: int('declared_peak_tq_rpm'),
  summary: json('summary').$type<PullSummary>().notNull(),
  fingerprint: varchar('fingerprint', { length: 255 }),
  /** The automatic evidence report (checkEvidence) as it stood when the pull was saved. */
  checks: json('checks').$type<EvidenceCheck[]>(),
  status: mysqlEnum('status', pullStatuses).notNull().default('submitted'),
  reviewNote: text('review_note'),
  reviewedAt: datetime('reviewed_at', { mode: 'date', fsp: 3 }),
  // A/B comparisons on one short block: one baseline, variants saying what changed.
  comparisonRole: mysqlEnum('comparison_role', comparisonRoles),
  changeKind: mysqlEnum('change_kind', changeKinds),
  changeNote: varchar('change_note', { length: 200 }),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, t => [
  index('dyno_pulls_build_idx').on(t.buildId),
  index('dyno_pulls_status_idx').on(t.status, t.createdAt),
])

export type User = typeof users.$inferSelect
export type NewUser = typeof users.$inferInsert
export type BuilderProfile = typeof builderProfiles.$inferSelect
export type Build = typeof builds.$inferSelect
export type NewBuild = typeof builds.$inferInsert
export type BuildPart = typeof buildParts.$inferSelect
export type StoredFile = typeof files.$inferSelect
export type DynoPull = typeof dynoPulls.$inferSelect

// ── Audit: every privileged action, written in the same transaction as the change ──

export const auditLog = mysqlTable('audit_log', {
  id: id(),
  actorId: ref('actor_id').references(() => users.id, { onDelete: 'set null' }),
  action: varchar('action', { length: 60 }).notNull(),
  entityType: varchar('entity_type', { length: 40 }).notNull(),
  entityId: bigint('entity_id', { mode: 'number', unsigned: true }).notNull(),
  before: json('before').$type<Record<string, unknown> | null>(),
  after: json('after').$type<Record<string, unknown> | null>(),
  note: text('note'),
  createdAt: createdAt(),
}, t => [
  index('audit_log_entity_idx').on(t.entityType, t.entityId),
  index('audit_log_created_idx').on(t.createdAt),
  index('audit_log_actor_idx').on(t.actorId),
  // The admin page filters by action and lists the actions on record.
  index('audit_log_action_idx').on(t.action, t.createdAt),
])

export type AuditEntry = typeof auditLog.$inferSelect

// ── Sign-in and roles ──
// E-mailed links (e-mail confirmation, passwordless sign-in, e-mail change): only the SHA-256 of
// the token is stored; a link works once (used_at) and until expires_at.
export const authTokenPurposes = ['verify_email', 'sign_in', 'change_email'] as const

export const authTokens = mysqlTable('auth_tokens', {
  id: id(),
  userId: ref('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  purpose: mysqlEnum('purpose', authTokenPurposes).notNull(),
  tokenHash: char('token_hash', { length: 64 }).notNull(),
  newEmail: varchar('new_email', { length: 254 }),
  expiresAt: datetime('expires_at', { mode: 'date', fsp: 3 }).notNull(),
  usedAt: datetime('used_at', { mode: 'date', fsp: 3 }),
  createdAt: createdAt(),
}, t => [
  uniqueIndex('auth_tokens_hash_unique').on(t.tokenHash),
  index('auth_tokens_user_idx').on(t.userId, t.purpose),
])

export type AuthToken = typeof authTokens.$inferSelect

// Rate-limit buckets (token buckets, see server/auth/rate-limit.ts) live in MariaDB rather than in
// memory so that every app instance behind a load balancer, and a restarted one, counts the same attempts.
export const rateLimitBuckets = mysqlTable('rate_limit_buckets', {
  key: varchar('bucket_key', { length: 320 }).primaryKey(),
  tokens: double('tokens').notNull(),
  updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 }).notNull(),
}, t => [index('rate_limit_buckets_updated_idx').on(t.updatedAt)])
