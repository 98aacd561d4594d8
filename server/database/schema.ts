import { sql } from 'drizzle-orm'
import {
  bigint, boolean, char, check, customType, date, datetime, decimal, double, index, int, json, mysqlEnum, mysqlTable, text, uniqueIndex, varchar,
} from 'drizzle-orm/mysql-core'
import { ASPIRATIONS, FUELS, ROLES, USES } from '../../shared/domain'
import { REQUIRED_FOR_PUBLISH } from '../../shared/schemas/build'
import type { CorrectionStandard, EvidenceCheck } from '../../shared/engine/types'
import { MILESTONE_STATES, TRANSMISSIONS } from '../../shared/deals/constants'
import type { DeliveryEvaluation } from '../../shared/deals/delivery'
import type { PullSummaryFigures } from '../../shared/pulls/summary'
import type { StandardFigures, StoredCurvePoint } from '../../shared/pulls/figures'
import type { SearchFilterParams } from '../../shared/schemas/search'
import type { ChangeOrderInput, QuoteAlternative } from '../../shared/schemas/deals'
import type { ClassRules } from '../../shared/schemas/class-rules'

/** Shared column shapes, so every table spells them once. */
const id = () => bigint('id', { mode: 'number', unsigned: true }).autoincrement().primaryKey()
const ref = (name: string) => bigint(name, { mode: 'number', unsigned: true })
const createdAt = () => datetime('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`)
const updatedAt = () => datetime('updated_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`).$onUpdate(() => new Date())
const inches = (name: string) => decimal(name, { precision: 7, scale: 4, mode: 'number' })
const cc = (name: string) => decimal(name, { precision: 7, scale: 2, mode: 'number' })
const degrees = (name: string) => decimal(name, { precision: 5, scale: 1, mode: 'number' })
const figure = (name: string) => decimal(name, { precision: 8, scale: 1, mode: 'number' })

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
  role: mysqlEnum('role', ROLES).notNull(),
  unitPreference: mysqlEnum('unit_preference', ['imperial', 'metric']).notNull().default('imperial'),
  emailVerifiedAt: datetime('email_verified_at', { mode: 'date', fsp: 3 }),
  suspendedAt: datetime('suspended_at', { mode: 'date', fsp: 3 }),
  // Carried in every session cookie; raising it ends every session issued before (server/utils/auth.ts).
  sessionVersion: int('session_version', { unsigned: true }).notNull().default(0),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, t => [uniqueIndex('users_email_unique').on(t.email)])

export const shops = mysqlTable('builder_profiles', {
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
  shopId: ref('builder_id').notNull().references(() => shops.id, { onDelete: 'cascade' }),
  slug: varchar('slug', { length: 160 }).notNull(),
  title: varchar('title', { length: 160 }).notNull(),
  // The combination may be NULL only while the build is a draft: publishing checks it with
  // shared/schemas/build.ts and the builds_published_complete constraint below holds it in the table.
  summary: text('summary'),
  engineFamily: varchar('engine_family', { length: 60 }),
  cylinders: int('cylinders'),
  boreIn: inches('bore_in'),
  strokeIn: inches('stroke_in'),
  rodLengthIn: inches('rod_length_in'),
  cylinderHeads: varchar('cylinder_heads', { length: 160 }),
  chamberCc: cc('chamber_cc'),
  pistonCc: cc('piston_cc'),
  gasketBoreIn: inches('gasket_bore_in'),
  gasketThicknessIn: inches('gasket_thickness_in'),
  deckClearanceIn: inches('deck_clearance_in'),
  camIntakeDurationDeg: degrees('cam_intake_duration_deg'),
  camExhaustDurationDeg: degrees('cam_exhaust_duration_deg'),
  camIntakeLiftIn: inches('cam_intake_lift_in'),
  camExhaustLiftIn: inches('cam_exhaust_lift_in'),
  camLobeSeparationDeg: degrees('cam_lobe_separation_deg'),
  camIntakeCenterlineDeg: degrees('cam_intake_centerline_deg'),
  intakeManifold: varchar('intake_manifold', { length: 160 }),
  throttleBody: varchar('throttle_body', { length: 80 }),
  injectorSizeLbHr: decimal('injector_size_lb_hr', { precision: 6, scale: 1, mode: 'number' }),
  injectorCount: int('injector_count'),
  fuel: mysqlEnum('fuel', FUELS),
  aspiration: mysqlEnum('aspiration', ASPIRATIONS),
  engineManagement: varchar('engine_management', { length: 120 }),
  intendedUse: mysqlEnum('intended_use', USES),
  priceCents: bigint('price_cents', { mode: 'number', unsigned: true }),
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
  index('builds_builder_idx').on(t.shopId),
  index('builds_status_idx').on(t.status),
  check('builds_published_complete', sql`${t.status} <> 'published' OR (${sql.join(REQUIRED_FOR_PUBLISH.map(k => sql`${t[k]} IS NOT NULL`), sql` AND `)})`),
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
export type PullFiguresRow = typeof pullFigures.$inferSelect

export const dynoPulls = mysqlTable('dyno_pulls', {
  id: id(),
  buildId: ref('build_id').notNull().references(() => builds.id, { onDelete: 'cascade' }),
  label: varchar('label', { length: 120 }).notNull(),
  fileId: ref('file_id').notNull().references(() => files.id),
  sheetFileId: ref('sheet_file_id').references(() => files.id),
  dynoKind: mysqlEnum('dyno_kind', dynoKinds).notNull(),
  declaredStandard: varchar('declared_standard', { length: 20 }).$type<CorrectionStandard>().notNull(),
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

/**
 * A pull's derived figures (shared/pulls/figures.ts), computed once from its raw file when the pull is
 * saved and read by the pages, the search index and the review desk. A row of an older `version`, or
 * none, is recomputed from the raw file on its first read (server/services/pull-figures.ts).
 */
export const pullFigures = mysqlTable('pull_figures', {
  pullId: ref('pull_id').primaryKey().references(() => dynoPulls.id, { onDelete: 'cascade' }),
  version: int('version').notNull(),
  standards: json('standards').$type<Record<CorrectionStandard, StandardFigures>>().notNull(),
  curve: json('curve').$type<StoredCurvePoint[]>().notNull(),
  searchCurve: json('search_curve').$type<{ startRpm: number, hp: number[] }>(),
  computedAt: datetime('computed_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`).$onUpdate(() => new Date()),
})

// ── Build editor: a build's photos, in the order the shop set ──

export const buildPhotos = mysqlTable('build_photos', {
  id: id(),
  buildId: ref('build_id').notNull().references(() => builds.id, { onDelete: 'cascade' }),
  fileId: ref('file_id').notNull().references(() => files.id),
  position: int('position').notNull(),
  caption: varchar('caption', { length: 160 }).notNull().default(''),
  createdAt: createdAt(),
}, t => [
  index('build_photos_build_idx').on(t.buildId, t.position),
  uniqueIndex('build_photos_file_unique').on(t.fileId),
])

export type User = typeof users.$inferSelect
export type NewUser = typeof users.$inferInsert
export type Shop = typeof shops.$inferSelect
export type Build = typeof builds.$inferSelect
export type NewBuild = typeof builds.$inferInsert
export type BuildPart = typeof buildParts.$inferSelect
export type StoredFile = typeof files.$inferSelect
export type DynoPull = typeof dynoPulls.$inferSelect
export type BuildPhoto = typeof buildPhotos.$inferSelect

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

// ─── Deals: quote requests, messages, quotes, orders, milestones, payments, outbox ─────────────

export const transmissions = TRANSMISSIONS
export const requestStatuses = ['open', 'quoted', 'accepted', 'declined', 'withdrawn'] as const
export const quoteStatuses = ['sent', 'accepted', 'declined', 'withdrawn'] as const
export const orderStatuses = ['active', 'completed', 'cancelled'] as const
export const milestoneStates = MILESTONE_STATES
export const paymentKinds = ['checkout', 'refund', 'transfer'] as const
export const paymentStatuses = ['open', 'succeeded', 'failed', 'expired'] as const
export const deliveryPullStatuses = ['verified', 'rejected'] as const

const cents = (name: string) => bigint(name, { mode: 'number', unsigned: true })
const day = (name: string) => date(name, { mode: 'string' })
const at = (name: string) => datetime(name, { mode: 'date', fsp: 3 })

/** A racer's request for a quote, to one shop, optionally from one of its published builds. */
export const quoteRequests = mysqlTable('quote_requests', {
  id: id(),
  racerId: ref('racer_id').notNull().references(() => users.id),
  shopId: ref('builder_id').notNull().references(() => shops.id),
  buildId: ref('build_id').references(() => builds.id, { onDelete: 'set null' }),
  title: varchar('title', { length: 160 }).notNull(),
  targetHp: figure('target_hp').notNull(),
  targetTq: figure('target_tq'),
  targetStandard: varchar('target_standard', { length: 20 }).notNull(),
  displacementCapCi: decimal('displacement_cap_ci', { precision: 6, scale: 1, mode: 'number' }),
  fuel: mysqlEnum('fuel', FUELS).notNull(),
  aspiration: mysqlEnum('aspiration', ASPIRATIONS).notNull(),
  intendedUse: mysqlEnum('intended_use', USES).notNull(),
  transmission: mysqlEnum('transmission', transmissions).notNull(),
  /** A car without a converter: the rpm it leaves the line at (from the racer's class rules, or typed). */
  launchRpm: int('launch_rpm', { unsigned: true }),
  stallRpm: int('stall_rpm', { unsigned: true }),
  shiftRpm: int('shift_rpm', { unsigned: true }),
  budgetMinCents: cents('budget_min_cents').notNull(),
  budgetMaxCents: cents('budget_max_cents').notNull(),
  deadline: day('deadline'),
  notes: text('notes').notNull(),
  status: mysqlEnum('status', requestStatuses).notNull().default('open'),
  lastMessageAt: at('last_message_at').notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, t => [
  index('quote_requests_racer_idx').on(t.racerId, t.lastMessageAt),
  index('quote_requests_builder_idx').on(t.shopId, t.lastMessageAt),
])

/** The thread of a request: messages both ways, and notes the system adds when the deal moves. */
export const requestMessages = mysqlTable('request_messages', {
  id: id(),
  requestId: ref('request_id').notNull().references(() => quoteRequests.id, { onDelete: 'cascade' }),
  senderId: ref('sender_id').references(() => users.id),
  kind: mysqlEnum('kind', ['message', 'event']).notNull().default('message'),
  body: text('body').notNull(),
  createdAt: createdAt(),
}, t => [index('request_messages_thread_idx').on(t.requestId, t.id)])

/** Files on a request (message_id null: sent with the request itself) or on one message. */
export const requestAttachments = mysqlTable('request_attachments', {
  id: id(),
  requestId: ref('request_id').notNull().references(() => quoteRequests.id, { onDelete: 'cascade' }),
  messageId: ref('message_id').references(() => requestMessages.id, { onDelete: 'cascade' }),
  fileId: ref('file_id').notNull().references(() => files.id),
}, t => [
  index('request_attachments_request_idx').on(t.requestId),
  uniqueIndex('request_attachments_file_unique').on(t.fileId),
])

/** How far each party has read each thread, for unread counts. */
export const messageReads = mysqlTable('message_reads', {
  id: id(),
  requestId: ref('request_id').notNull().references(() => quoteRequests.id, { onDelete: 'cascade' }),
  userId: ref('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  lastReadMessageId: ref('last_read_message_id').notNull().default(0),
  lastSeenAt: at('last_seen_at').notNull().default(sql`CURRENT_TIMESTAMP(3)`),
}, t => [uniqueIndex('message_reads_unique').on(t.requestId, t.userId)])

/** A shop's quote on a request; its figures live in revisions, the newest being current. */
export const quotes = mysqlTable('quotes', {
  id: id(),
  requestId: ref('request_id').notNull().references(() => quoteRequests.id, { onDelete: 'cascade' }),
  shopId: ref('builder_id').notNull().references(() => shops.id),
  status: mysqlEnum('status', quoteStatuses).notNull().default('sent'),
  currentRevision: int('current_revision', { unsigned: true }).notNull().default(1),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, t => [uniqueIndex('quotes_request_unique').on(t.requestId)])

export const quoteRevisions = mysqlTable('quote_revisions', {
  id: id(),
  quoteId: ref('quote_id').notNull().references(() => quotes.id, { onDelete: 'cascade' }),
  revision: int('revision', { unsigned: true }).notNull(),
  totalCents: cents('total_cents').notNull(),
  platformFeeBp: int('platform_fee_bp', { unsigned: true }).notNull(),
  platformFeeCents: cents('platform_fee_cents').notNull(),
  validUntil: day('valid_until').notNull(),
  notes: text('notes').notNull(),
  guaranteeHp: figure('guarantee_hp'),
  guaranteeTolerancePct: decimal('guarantee_tolerance_pct', { precision: 4, scale: 1, mode: 'number' }),
  guaranteeStandard: varchar('guarantee_standard', { length: 20 }),
  /** Another combination offered beside the line items, as validated by alternativeSchema; its displacement is computed when shown. */
  alternative: json('alternative').$type<QuoteAlternative>(),
  createdAt: createdAt(),
}, t => [uniqueIndex('quote_revisions_unique').on(t.quoteId, t.revision)])

export const quoteLineItems = mysqlTable('quote_line_items', {
  id: id(),
  revisionId: ref('revision_id').notNull().references(() => quoteRevisions.id, { onDelete: 'cascade' }),
  position: int('position', { unsigned: true }).notNull(),
  category: varchar('category', { length: 60 }).notNull(),
  description: varchar('description', { length: 200 }).notNull(),
  partNumber: varchar('part_number', { length: 80 }).notNull().default(''),
  quantity: int('quantity', { unsigned: true }).notNull(),
  unitPriceCents: cents('unit_price_cents').notNull(),
}, t => [uniqueIndex('quote_line_items_position_unique').on(t.revisionId, t.position)])

export const quoteMilestones = mysqlTable('quote_milestones', {
  id: id(),
  revisionId: ref('revision_id').notNull().references(() => quoteRevisions.id, { onDelete: 'cascade' }),
  position: int('position', { unsigned: true }).notNull(),
  title: varchar('title', { length: 120 }).notNull(),
  deliverable: text('deliverable').notNull(),
  amountCents: cents('amount_cents').notNull(),
  dueDate: day('due_date').notNull(),
}, t => [uniqueIndex('quote_milestones_position_unique').on(t.revisionId, t.position)])

/** An accepted quote: the work the racer is paying for, milestone by milestone. */
export const orders = mysqlTable('orders', {
  id: id(),
  requestId: ref('request_id').notNull().references(() => quoteRequests.id),
  quoteId: ref('quote_id').notNull().references(() => quotes.id),
  revisionId: ref('revision_id').notNull().references(() => quoteRevisions.id),
  racerId: ref('racer_id').notNull().references(() => users.id),
  shopId: ref('builder_id').notNull().references(() => shops.id),
  totalCents: cents('total_cents').notNull(),
  platformFeeCents: cents('platform_fee_cents').notNull(),
  currency: char('currency', { length: 3 }).notNull().default('usd'),
  status: mysqlEnum('status', orderStatuses).notNull().default('active'),
  cancelledAt: at('cancelled_at'),
  cancelledBy: ref('cancelled_by').references(() => users.id),
  completedAt: at('completed_at'),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, t => [
  uniqueIndex('orders_request_unique').on(t.requestId),
  index('orders_racer_idx').on(t.racerId),
  index('orders_builder_idx').on(t.shopId),
])

/** One milestone of an order: its money moves only through the state column, checked in a locked transaction. */
export const milestones = mysqlTable('milestones', {
  id: id(),
  orderId: ref('order_id').notNull().references(() => orders.id),
  position: int('position', { unsigned: true }).notNull(),
  title: varchar('title', { length: 120 }).notNull(),
  deliverable: text('deliverable').notNull(),
  amountCents: cents('amount_cents').notNull(),
  feeCents: cents('fee_cents').notNull(),
  dueDate: day('due_date').notNull(),
  guaranteed: boolean('guaranteed').notNull().default(false),
  state: mysqlEnum('state', milestoneStates).notNull().default('awaiting_payment'),
  checkoutAttempt: int('checkout_attempt', { unsigned: true }).notNull().default(0),
  submissionNotes: text('submission_notes'),
  deliveryPullId: ref('delivery_pull_id'),
  disputeReason: text('dispute_reason'),
  autoApproved: boolean('auto_approved').notNull().default(false),
  fundedAt: at('funded_at'),
  submittedAt: at('submitted_at'),
  approvedAt: at('approved_at'),
  releasedAt: at('released_at'),
  disputedAt: at('disputed_at'),
  refundedAt: at('refunded_at'),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, t => [
  uniqueIndex('milestones_position_unique').on(t.orderId, t.position),
  index('milestones_state_idx').on(t.state, t.submittedAt),
])

export const changeOrderStatuses = ['open', 'accepted', 'declined'] as const

/**
 * A shop's revised plan for the rest of an order after a refunded milestone: the milestones (and
 * optional line items) that replace the ones still awaiting payment once the racer accepts. One
 * open change order per order, checked under the order's row lock.
 */
export const changeOrders = mysqlTable('change_orders', {
  id: id(),
  orderId: ref('order_id').notNull().references(() => orders.id),
  status: mysqlEnum('status', changeOrderStatuses).notNull().default('open'),
  totalCents: cents('total_cents').notNull(),
  milestones: json('milestones').$type<ChangeOrderInput['milestones']>().notNull(),
  lineItems: json('line_items').$type<ChangeOrderInput['lineItems']>().notNull(),
  notes: text('notes').notNull(),
  declineReason: text('decline_reason'),
  createdBy: ref('created_by').notNull().references(() => users.id),
  answeredAt: at('answered_at'),
  createdAt: createdAt(),
}, t => [index('change_orders_order_idx').on(t.orderId, t.status)])

/** Photos and files a shop sends as proof with a submitted milestone. */
export const milestoneProofs = mysqlTable('milestone_proofs', {
  id: id(),
  milestoneId: ref('milestone_id').notNull().references(() => milestones.id, { onDelete: 'cascade' }),
  fileId: ref('file_id').notNull().references(() => files.id),
}, t => [uniqueIndex('milestone_proofs_file_unique').on(t.fileId)])

/** The pull a guaranteed milestone is delivered against, with its figures under the quoted standard. */
export const deliveryPulls = mysqlTable('delivery_pulls', {
  id: id(),
  milestoneId: ref('milestone_id').notNull().references(() => milestones.id, { onDelete: 'cascade' }),
  fileId: ref('file_id').notNull().references(() => files.id),
  declaredStandard: varchar('declared_standard', { length: 20 }).$type<CorrectionStandard>().notNull(),
  baroInHg: decimal('baro_in_hg', { precision: 5, scale: 2, mode: 'number' }),
  airTempF: decimal('air_temp_f', { precision: 5, scale: 1, mode: 'number' }),
  humidityPct: decimal('humidity_pct', { precision: 4, scale: 1, mode: 'number' }),
  boreIn: inches('bore_in').notNull(),
  strokeIn: inches('stroke_in').notNull(),
  cylinders: int('cylinders').notNull(),
  report: json('report').$type<DeliveryReport>().notNull(),
  status: mysqlEnum('status', deliveryPullStatuses).notNull(),
  meetsTarget: boolean('meets_target').notNull(),
  createdAt: createdAt(),
}, t => [index('delivery_pulls_milestone_idx').on(t.milestoneId)])

/** Money moving for a milestone, with the Stripe ids: a Checkout Session, a refund or a transfer. */
export const payments = mysqlTable('payments', {
  id: id(),
  milestoneId: ref('milestone_id').notNull().references(() => milestones.id),
  kind: mysqlEnum('kind', paymentKinds).notNull(),
  status: mysqlEnum('status', paymentStatuses).notNull(),
  amountCents: cents('amount_cents').notNull(),
  currency: char('currency', { length: 3 }).notNull().default('usd'),
  attempt: int('attempt', { unsigned: true }).notNull().default(0),
  stripeCheckoutSessionId: varchar('stripe_checkout_session_id', { length: 255 }),
  stripePaymentIntentId: varchar('stripe_payment_intent_id', { length: 255 }),
  stripeChargeId: varchar('stripe_charge_id', { length: 255 }),
  stripeRefundId: varchar('stripe_refund_id', { length: 255 }),
  stripeTransferId: varchar('stripe_transfer_id', { length: 255 }),
  checkoutUrl: varchar('checkout_url', { length: 1000 }),
  failureMessage: varchar('failure_message', { length: 500 }),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, t => [
  index('payments_milestone_idx').on(t.milestoneId, t.kind),
  uniqueIndex('payments_checkout_unique').on(t.stripeCheckoutSessionId),
  uniqueIndex('payments_refund_unique').on(t.stripeRefundId),
  uniqueIndex('payments_transfer_unique').on(t.stripeTransferId),
  index('payments_intent_idx').on(t.stripePaymentIntentId),
])

/** The shop's connected account that releases are transferred to. */
export const payoutAccounts = mysqlTable('payout_accounts', {
  id: id(),
  shopId: ref('builder_id').notNull().references(() => shops.id, { onDelete: 'cascade' }),
  stripeAccountId: varchar('stripe_account_id', { length: 255 }).notNull(),
  createdAt: createdAt(),
}, t => [
  uniqueIndex('payout_accounts_builder_unique').on(t.shopId),
  uniqueIndex('payout_accounts_stripe_unique').on(t.stripeAccountId),
])

/** Every webhook event id processed once: the unique key is the guard against replays and duplicates. */
export const stripeEvents = mysqlTable('stripe_events', {
  id: id(),
  eventId: varchar('event_id', { length: 255 }).notNull(),
  type: varchar('type', { length: 100 }).notNull(),
  outcome: varchar('outcome', { length: 500 }).notNull(),
  processedAt: createdAt(),
}, t => [uniqueIndex('stripe_events_event_unique').on(t.eventId)])

/** Who moved a deal and how, in order: the order page's history and the audit trail of money. */
export const dealEvents = mysqlTable('deal_events', {
  id: id(),
  requestId: ref('request_id').notNull().references(() => quoteRequests.id, { onDelete: 'cascade' }),
  orderId: ref('order_id').references(() => orders.id),
  milestoneId: ref('milestone_id').references(() => milestones.id),
  actorId: ref('actor_id').references(() => users.id),
  action: varchar('action', { length: 60 }).notNull(),
  detail: varchar('detail', { length: 500 }).notNull().default(''),
  createdAt: createdAt(),
}, t => [index('deal_events_request_idx').on(t.requestId, t.id)])

/** E-mail waiting to go out: written in the same transaction as the change it reports, sent and retried by the drainer. */
export const mailOutbox = mysqlTable('mail_outbox', {
  id: id(),
  dedupeKey: varchar('dedupe_key', { length: 191 }),
  toAddress: varchar('to_address', { length: 254 }).notNull(),
  subject: varchar('subject', { length: 200 }).notNull(),
  text: text('text').notNull(),
  html: text('html').notNull(),
  attempts: int('attempts', { unsigned: true }).notNull().default(0),
  nextAttemptAt: at('next_attempt_at').notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  sentAt: at('sent_at'),
  lastError: varchar('last_error', { length: 1000 }),
  createdAt: createdAt(),
}, t => [
  uniqueIndex('mail_outbox_dedupe_unique').on(t.dedupeKey),
  index('mail_outbox_due_idx').on(t.sentAt, t.nextAttemptAt),
])

/** What the server found in a delivery pull, as stored: the evaluation less the chart curve and the verdicts. */
export type DeliveryReport = Omit<DeliveryEvaluation, 'curve' | 'status' | 'meetsTarget'>

export type QuoteRequest = typeof quoteRequests.$inferSelect
export type RequestMessage = typeof requestMessages.$inferSelect
export type Quote = typeof quotes.$inferSelect
export type QuoteRevision = typeof quoteRevisions.$inferSelect
export type QuoteLineItem = typeof quoteLineItems.$inferSelect
export type QuoteMilestone = typeof quoteMilestones.$inferSelect
export type Order = typeof orders.$inferSelect
export type Milestone = typeof milestones.$inferSelect
export type ChangeOrder = typeof changeOrders.$inferSelect
export type MilestoneState = Milestone['state']
export type Payment = typeof payments.$inferSelect
export type DeliveryPull = typeof deliveryPulls.$inferSelect
export type OutboxMail = typeof mailOutbox.$inferSelect

/**
 * A search a signed-in user keeps: its filters as validated by shared/schemas/search.ts (the
 * GET /api/search parameters less sort, page and perPage), and whether a new verified build that
 * matches them is e-mailed.
 */
export const savedSearches = mysqlTable('saved_searches', {
  id: id(),
  userId: ref('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  name: varchar('name', { length: 80 }).notNull(),
  query: json('query').$type<SearchFilterParams>().notNull(),
  emailOn: boolean('email_on').notNull().default(true),
  lastNotifiedAt: at('last_notified_at'),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
}, t => [index('saved_searches_user_idx').on(t.userId, t.id)])

/** The builds a saved search has announced: one row per search and build, so a build is announced once. */
export const savedSearchAnnouncements = mysqlTable('saved_search_announcements', {
  id: id(),
  savedSearchId: ref('saved_search_id').notNull().references(() => savedSearches.id, { onDelete: 'cascade' }),
  buildId: ref('build_id').notNull().references(() => builds.id, { onDelete: 'cascade' }),
  mailed: boolean('mailed').notNull(),
  createdAt: createdAt(),
}, t => [
  uniqueIndex('saved_search_announcements_unique').on(t.savedSearchId, t.buildId),
  index('saved_search_announcements_build_idx').on(t.buildId),
])

export type SavedSearch = typeof savedSearches.$inferSelect

/**
 * A person's notification state: how far they have read the deal events of their deals (an event id,
 * never moved back) and the groups of deal e-mail they switched off (keys of shared/deals/notifications.ts).
 * No row means nothing read and every e-mail on.
 */
export const notificationSettings = mysqlTable('notification_settings', {
  userId: ref('user_id').primaryKey().references(() => users.id, { onDelete: 'cascade' }),
  readUpToEventId: ref('read_up_to_event_id').notNull().default(0),
  emailOff: json('email_off').$type<string[]>().notNull(),
  updatedAt: updatedAt(),
})

export type NotificationSettings = typeof notificationSettings.$inferSelect

/** A racer's class rules (shared/schemas/class-rules.ts): one row per racer, the rules as one JSON document. */
export const classRules = mysqlTable('class_rules', {
  userId: ref('user_id').primaryKey().references(() => users.id, { onDelete: 'cascade' }),
  rules: json('rules').$type<ClassRules>().notNull(),
  updatedAt: updatedAt(),
})

export type ClassRulesRow = typeof classRules.$inferSelect
// ── Reviews: a racer's word on a completed order, the shop's one answer, and the edits kept ──

/** The named aspects a review may rate besides the overall rating (keys of shared/reviews/aspects.ts). */
export interface ReviewAspects {
  communication: number | null
  keptToQuote: number | null
  powerVsTarget: number | null
  finishAndPaperwork: number | null
}

/**
 * One review per order (the unique key), by the order's racer once the order is completed. The shop's
 * one public answer lives on the row; an admin may hide it with a reason (and an audit row).
 */
export const reviews = mysqlTable('reviews', {
  id: id(),
  orderId: ref('order_id').notNull().references(() => orders.id),
  shopId: ref('builder_id').notNull().references(() => shops.id, { onDelete: 'cascade' }),
  buildId: ref('build_id').references(() => builds.id, { onDelete: 'set null' }),
  authorId: ref('author_id').notNull().references(() => users.id),
  rating: int('rating', { unsigned: true }).notNull(),
  aspects: json('aspects').$type<ReviewAspects>().notNull(),
  body: text('body').notNull(),
  showDeliveryPull: boolean('show_delivery_pull').notNull().default(false),
  answer: text('answer'),
  answeredAt: at('answered_at'),
  hiddenAt: at('hidden_at'),
  hiddenReason: text('hidden_reason'),
  hiddenBy: ref('hidden_by').references(() => users.id, { onDelete: 'set null' }),
  editedAt: at('edited_at'),
  createdAt: createdAt(),
}, t => [
  uniqueIndex('reviews_order_unique').on(t.orderId),
  index('reviews_builder_idx').on(t.shopId, t.createdAt),
  index('reviews_build_idx').on(t.buildId),
  check('reviews_rating_range', sql`${t.rating} between 1 and 5`),
])

/** A review as it read before each edit, oldest first: edits within the window keep their history. */
export const reviewEdits = mysqlTable('review_edits', {
  id: id(),
  reviewId: ref('review_id').notNull().references(() => reviews.id, { onDelete: 'cascade' }),
  rating: int('rating', { unsigned: true }).notNull(),
  aspects: json('aspects').$type<ReviewAspects>().notNull(),
  body: text('body').notNull(),
  showDeliveryPull: boolean('show_delivery_pull').notNull(),
  /** When the replaced version was written (the review's creation, or its previous edit). */
  writtenAt: at('written_at').notNull(),
  createdAt: createdAt(),
}, t => [index('review_edits_review_idx').on(t.reviewId, t.id)])

export type Review = typeof reviews.$inferSelect
export type ReviewEdit = typeof reviewEdits.$inferSelect
/**
 * The change feed of the search index: one row per change to a build, written in the same transaction
 * as the change, read in position order by every server instance (server/services/search-feed.ts) so a
 * change made on one instance reaches the others' indexes within a second. Append-only; old rows are pruned.
 */
export const buildChanges = mysqlTable('build_changes', {
  id: id(),
  buildId: ref('build_id').notNull(),
  createdAt: createdAt(),
}, t => [index('build_changes_created_idx').on(t.createdAt)])

/** Bytes as MariaDB's LONGBLOB (up to 4 GB; an upload is at most 10 MB, shared/uploads.ts). */
const longblob = customType<{ data: Buffer, driverData: Buffer }>({ dataType: () => 'longblob' })

/**
 * Uploaded files' bytes when the uploads storage is MariaDB (NUXT_UPLOADS_DRIVER=mariadb): the files
 * then replicate with the rows, so every server instance on a Galera cluster reads every upload.
 */
export const storedFiles = mysqlTable('stored_files', {
  storageKey: varchar('storage_key', { length: 255 }).primaryKey(),
  body: longblob('body').notNull(),
  sizeBytes: int('size_bytes', { unsigned: true }).notNull(),
  updatedAt: updatedAt(),
})
