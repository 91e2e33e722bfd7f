import { sql } from 'drizzle-orm'
import {
  type AnySQLiteColumn,
  blob,
  index,
  integer,
  real,
  sqliteTable,
  text,
  uniqueIndex,
} from 'drizzle-orm/sqlite-core'
import type { RunSettings } from '../../shared/schemas/runs.js'
import { COMBINATIONS } from '../../shared/vocabulary/combinations.js'
import { STORED_REVIEW_STATES } from '../../shared/vocabulary/reviewStates.js'
import { RUN_STATUSES } from '../../shared/vocabulary/runStatuses.js'

// Times are stored as integer milliseconds since the epoch (UTC).
const createdAt = () =>
  integer('created_at', { mode: 'number' })
    .notNull()
    .default(sql`(CAST(unixepoch('subsec') * 1000 AS INTEGER))`)

export const firms = sqliteTable('firms', {
  id: text('id').primaryKey(),
  name: text('name').notNull(),
  stripeCustomerId: text('stripe_customer_id'),
  createdAt: createdAt(),
})

export const users = sqliteTable('users', {
  id: text('id').primaryKey(),
  email: text('email').notNull().unique(),
  name: text('name').notNull(),
  passwordHash: text('password_hash').notNull(),
  createdAt: createdAt(),
})

/** A member of a firm. `roles` is a JSON array of 'engineer' | 'checker' | 'admin'. */
export const memberships = sqliteTable(
  'memberships',
  {
    id: text('id').primaryKey(),
    firmId: text('firm_id')
      .notNull()
      .references(() => firms.id),
    userId: text('user_id')
      .notNull()
      .references(() => users.id),
    roles: text('roles', { mode: 'json' }).$type<string[]>().notNull(),
    /** The member's units for pages and files: 'si', or 'us' (US customary). JSON stays SI. */
    units: text('units', { enum: ['si', 'us'] })
      .notNull()
      .default('si'),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('memberships_user_unique').on(t.userId)],
)

export const sessions = sqliteTable('sessions', {
  sid: text('sid').primaryKey(),
  data: text('data').notNull(),
  expiresAt: integer('expires_at', { mode: 'number' }).notNull(),
})

export const invitations = sqliteTable('invitations', {
  id: text('id').primaryKey(),
  firmId: text('firm_id')
    .notNull()
    .references(() => firms.id),
  email: text('email').notNull(),
  roles: text('roles', { mode: 'json' }).$type<string[]>().notNull(),
  tokenHash: text('token_hash').notNull().unique(),
  invitedBy: text('invited_by')
    .notNull()
    .references(() => users.id),
  expiresAt: integer('expires_at', { mode: 'number' }).notNull(),
  acceptedAt: integer('accepted_at', { mode: 'number' }),
  createdAt: createdAt(),
})

export const passwordResets = sqliteTable('password_resets', {
  id: text('id').primaryKey(),
  userId: text('user_id')
    .notNull()
    .references(() => users.id),
  tokenHash: text('token_hash').notNull().unique(),
  expiresAt: integer('expires_at', { mode: 'number' }).notNull(),
  usedAt: integer('used_at', { mode: 'number' }),
  createdAt: createdAt(),
})

/** Append-only: rows are inserted, never updated or deleted. */
export const auditLog = sqliteTable(
  'audit_log',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    firmId: text('firm_id'),
    userId: text('user_id'),
    action: text('action').notNull(),
    subjectType: text('subject_type'),
    subjectId: text('subject_id'),
    detail: text('detail', { mode: 'json' }).$type<Record<string, unknown>>(),
    createdAt: createdAt(),
  },
  (t) => [index('audit_log_firm_idx').on(t.firmId, t.createdAt)],
)

/** Outgoing mail is queued here first, so a mail server that is down never fails the action. */
export const mailOutbox = sqliteTable('mail_outbox', {
  id: text('id').primaryKey(),
  toAddress: text('to_address').notNull(),
  subject: text('subject').notNull(),
  textBody: text('text_body').notNull(),
  htmlBody: text('html_body').notNull(),
  status: text('status', { enum: ['queued', 'sent', 'failed'] })
    .notNull()
    .default('queued'),
  attempts: integer('attempts').notNull().default(0),
  lastError: text('last_error'),
  nextAttemptAt: integer('next_attempt_at', { mode: 'number' }).notNull(),
  sentAt: integer('sent_at', { mode: 'number' }),
  createdAt: createdAt(),
})

export const projects = sqliteTable(
  'projects',
  {
    id: text('id').primaryKey(),
    firmId: text('firm_id')
      .notNull()
      .references(() => firms.id),
    name: text('name').notNull(),
    description: text('description').notNull().default(''),
    isDefault: integer('is_default', { mode: 'boolean' }).notNull().default(false),
    /** When the project was archived; null while it is active. */
    archivedAt: integer('archived_at', { mode: 'number' }),
    createdBy: text('created_by').references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('projects_firm_idx').on(t.firmId)],
)

export const records = sqliteTable(
  'records',
  {
    id: text('id').primaryKey(),
    firmId: text('firm_id')
      .notNull()
      .references(() => firms.id),
    projectId: text('project_id')
      .notNull()
      .references(() => projects.id),
    name: text('name').notNull(),
    component: text('component'),
    sourceFileName: text('source_file_name').notNull(),
    sha256: text('sha256').notNull(),
    format: text('format').notNull(),
    sourceUnits: text('source_units').notNull(),
    points: integer('points').notNull(),
    dtS: real('dt_s').notNull(),
    durationS: real('duration_s').notNull(),
    pgaMPerS2: real('pga_m_per_s2').notNull(),
    pgvMPerS: real('pgv_m_per_s').notNull(),
    pgdM: real('pgd_m').notNull(),
    ariasMPerS: real('arias_m_per_s').notNull(),
    d595S: real('d595_s').notNull(),
    cavMPerS: real('cav_m_per_s').notNull(),
    warnings: text('warnings', { mode: 'json' }).$type<string[]>().notNull(),
    /** Parsed samples in m/s², little-endian Float64. */
    samples: blob('samples', { mode: 'buffer' }).notNull(),
    synthetic: integer('synthetic', { mode: 'boolean' }).notNull().default(false),
    /** The record this one was processed from; null for a record as received. */
    parentId: text('parent_id').references((): AnySQLiteColumn => records.id),
    /** A processed record's processing as applied, with its chain (shared/schemas/processing.ts). */
    processing: text('processing', { mode: 'json' }).$type<Record<string, unknown>>(),
    uploadedBy: text('uploaded_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('records_firm_idx').on(t.firmId, t.projectId), index('records_parent_idx').on(t.parentId)],
)

export const recordPairs = sqliteTable('record_pairs', {
  id: text('id').primaryKey(),
  firmId: text('firm_id')
    .notNull()
    .references(() => firms.id),
  projectId: text('project_id')
    .notNull()
    .references(() => projects.id),
  name: text('name').notNull(),
  record1Id: text('record1_id')
    .notNull()
    .references(() => records.id),
  record2Id: text('record2_id')
    .notNull()
    .references(() => records.id),
  createdBy: text('created_by')
    .notNull()
    .references(() => users.id),
  createdAt: createdAt(),
})

export const runs = sqliteTable(
  'runs',
  {
    id: text('id').primaryKey(),
    firmId: text('firm_id')
      .notNull()
      .references(() => firms.id),
    projectId: text('project_id')
      .notNull()
      .references(() => projects.id),
    recordId: text('record_id').references(() => records.id),
    pairId: text('pair_id').references(() => recordPairs.id),
    status: text('status', { enum: RUN_STATUSES }).notNull(),
    progress: real('progress').notNull().default(0),
    error: text('error'),
    /** Written from the run request, read back through decodeRunSettings (server/db/parseStored.ts). */
    settings: text('settings', { mode: 'json' }).$type<RunSettings>().notNull(),
    creditsCharged: integer('credits_charged').notNull().default(0),
    recordSha256: text('record_sha256').notNull(),
    engineVersion: text('engine_version'),
    timings: text('timings', { mode: 'json' }).$type<Record<string, number>>(),
    attempts: integer('attempts').notNull().default(0),
    /** The run this one re-runs after its predecessor was checked and locked. */
    revisionOf: text('revision_of'),
    revision: integer('revision').notNull().default(1),
    createdBy: text('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    startedAt: integer('started_at', { mode: 'number' }),
    finishedAt: integer('finished_at', { mode: 'number' }),
  },
  (t) => [
    index('runs_firm_idx').on(t.firmId, t.createdAt),
    index('runs_status_idx').on(t.status, t.createdAt),
  ],
)

/** One row per finished run: the spectrum JSON (the shape of shared/schemas/spectrum.ts). */
export const spectra = sqliteTable('spectra', {
  runId: text('run_id')
    .primaryKey()
    .references(() => runs.id),
  result: text('result', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
  createdAt: createdAt(),
})

/** Append-only credit ledger; a firm's balance is the sum of its deltas. */
export const creditLedger = sqliteTable(
  'credit_ledger',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    firmId: text('firm_id')
      .notNull()
      .references(() => firms.id),
    delta: integer('delta').notNull(),
    kind: text('kind', {
      enum: ['grant', 'purchase', 'run_reserved', 'run_returned'],
    }).notNull(),
    runId: text('run_id'),
    purchaseId: text('purchase_id'),
    userId: text('user_id'),
    note: text('note'),
    createdAt: createdAt(),
  },
  (t) => [index('credit_ledger_firm_idx').on(t.firmId)],
)

export const purchases = sqliteTable(
  'purchases',
  {
    id: text('id').primaryKey(),
    firmId: text('firm_id')
      .notNull()
      .references(() => firms.id),
    /** The client-generated idempotency id. */
    clientPurchaseId: text('client_purchase_id').notNull(),
    packId: text('pack_id').notNull(),
    credits: integer('credits').notNull(),
    amountCents: integer('amount_cents').notNull(),
    currency: text('currency').notNull(),
    status: text('status', { enum: ['pending', 'succeeded', 'declined', 'failed'] }).notNull(),
    stripeChargeId: text('stripe_charge_id'),
    failureCode: text('failure_code'),
    failureMessage: text('failure_message'),
    createdBy: text('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    finishedAt: integer('finished_at', { mode: 'number' }),
  },
  (t) => [uniqueIndex('purchases_client_id_unique').on(t.firmId, t.clientPurchaseId)],
)

export const targets = sqliteTable('targets', {
  id: text('id').primaryKey(),
  firmId: text('firm_id')
    .notNull()
    .references(() => firms.id),
  projectId: text('project_id')
    .notNull()
    .references(() => projects.id),
  name: text('name').notNull(),
  definition: text('definition', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
  createdBy: text('created_by')
    .notNull()
    .references(() => users.id),
  createdAt: createdAt(),
})

export const comparisons = sqliteTable('comparisons', {
  id: text('id').primaryKey(),
  firmId: text('firm_id')
    .notNull()
    .references(() => firms.id),
  projectId: text('project_id')
    .notNull()
    .references(() => projects.id),
  name: text('name').notNull(),
  runIds: text('run_ids', { mode: 'json' }).$type<string[]>().notNull(),
  dampingRatio: real('damping_ratio').notNull(),
  target: text('target', { mode: 'json' }).$type<Record<string, unknown>>(),
  scaling: text('scaling', { mode: 'json' }).$type<Record<string, unknown>>(),
  /** 'arithmetic' or 'geometric': the suite mean drawn and checked against the target. */
  meanKind: text('mean_kind', { enum: ['arithmetic', 'geometric'] })
    .notNull()
    .default('arithmetic'),
  /** For runs of record pairs: which combination of the two components is compared. */
  combination: text('combination', { enum: COMBINATIONS }),
  /** The comparison this one revises after its predecessor was checked and locked. */
  revisionOf: text('revision_of'),
  revision: integer('revision').notNull().default(1),
  createdBy: text('created_by')
    .notNull()
    .references(() => users.id),
  createdAt: createdAt(),
  updatedAt: integer('updated_at', { mode: 'number' }),
})

export const reviews = sqliteTable(
  'reviews',
  {
    id: text('id').primaryKey(),
    firmId: text('firm_id')
      .notNull()
      .references(() => firms.id),
    subjectType: text('subject_type', { enum: ['run', 'comparison'] }).notNull(),
    subjectId: text('subject_id').notNull(),
    state: text('state', { enum: STORED_REVIEW_STATES }).notNull(),
    submittedBy: text('submitted_by')
      .notNull()
      .references(() => users.id),
    submittedAt: integer('submitted_at', { mode: 'number' }).notNull(),
    decidedBy: text('decided_by').references(() => users.id),
    decidedAt: integer('decided_at', { mode: 'number' }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('reviews_subject_unique').on(t.subjectType, t.subjectId)],
)

export const reviewComments = sqliteTable('review_comments', {
  id: text('id').primaryKey(),
  reviewId: text('review_id')
    .notNull()
    .references(() => reviews.id),
  authorId: text('author_id')
    .notNull()
    .references(() => users.id),
  body: text('body').notNull(),
  createdAt: createdAt(),
})

/** A batch of runs started by one request, with one set of settings (POST /api/run-batches). */
export const runBatches = sqliteTable(
  'run_batches',
  {
    id: text('id').primaryKey(),
    firmId: text('firm_id')
      .notNull()
      .references(() => firms.id),
    /** The project of its subjects, or null when they span several. */
    projectId: text('project_id').references(() => projects.id),
    settings: text('settings', { mode: 'json' }).$type<Record<string, unknown>>().notNull(),
    createdBy: text('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('run_batches_firm_idx').on(t.firmId, t.createdAt)],
)

/** The runs of a batch, in the batch's order (records first, then pairs, as given). */
export const runBatchRuns = sqliteTable(
  'run_batch_runs',
  {
    batchId: text('batch_id')
      .notNull()
      .references(() => runBatches.id),
    runId: text('run_id')
      .notNull()
      .references(() => runs.id),
    position: integer('position').notNull(),
  },
  (t) => [
    uniqueIndex('run_batch_runs_position_unique').on(t.batchId, t.position),
    uniqueIndex('run_batch_runs_run_unique').on(t.runId),
  ],
)

/**
 * Personal API tokens for scripts (Authorization: Bearer). Only the SHA-256 of the secret is
 * kept. A token belongs to one membership: once the member leaves the firm it stops working.
 */
export const apiTokens = sqliteTable(
  'api_tokens',
  {
    id: text('id').primaryKey(),
    firmId: text('firm_id')
      .notNull()
      .references(() => firms.id),
    userId: text('user_id')
      .notNull()
      .references(() => users.id),
    /** The membership it was made under (no foreign key: removing a member deletes the row, and the token dies with it). */
    membershipId: text('membership_id').notNull(),
    name: text('name').notNull(),
    /** At most the member's roles when made; in use, also cut to the member's current roles. */
    roles: text('roles', { mode: 'json' }).$type<string[]>().notNull(),
    tokenHash: text('token_hash').notNull().unique(),
    /** The first characters of the secret, to tell tokens apart in lists. */
    hint: text('hint').notNull(),
    expiresAt: integer('expires_at', { mode: 'number' }),
    lastUsedAt: integer('last_used_at', { mode: 'number' }),
    revokedAt: integer('revoked_at', { mode: 'number' }),
    revokedBy: text('revoked_by').references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('api_tokens_firm_idx').on(t.firmId, t.userId)],
)
