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

// Times are stored as integer milliseconds since the epoch (UTC); null until it happens
// unless `.notNull()`.
const time = (name: string) => integer(name, { mode: 'number' })

const createdAt = () =>
  time('created_at')
    .notNull()
    .default(sql`(CAST(unixepoch('subsec') * 1000 AS INTEGER))`)

/** A JSON document kept as text. */
const json = <T>(name: string) => text(name, { mode: 'json' }).$type<T>()

/** The text id most tables are keyed by. */
const id = () => text('id').primaryKey()

/** The firm a row belongs to. */
const firmId = () =>
  text('firm_id')
    .notNull()
    .references(() => firms.id)

/** The project a row belongs to. */
const projectId = () =>
  text('project_id')
    .notNull()
    .references(() => projects.id)

/** A user who acted on the row (created, uploaded, invited, submitted, wrote). */
const userId = (name: string) =>
  text(name)
    .notNull()
    .references(() => users.id)

/** The member who made the row, and when. */
const creation = () => ({ createdBy: userId('created_by'), createdAt: createdAt() })

/** A row that can be revised once its predecessor was checked and locked. */
const revisions = () => ({
  revisionOf: text('revision_of'),
  revision: integer('revision').notNull().default(1),
})

export const firms = sqliteTable('firms', {
  id: id(),
  name: text('name').notNull(),
  stripeCustomerId: text('stripe_customer_id'),
  createdAt: createdAt(),
})

export const users = sqliteTable('users', {
  id: id(),
  email: text('email').notNull().unique(),
  name: text('name').notNull(),
  passwordHash: text('password_hash').notNull(),
  createdAt: createdAt(),
})

/** A member of a firm. `roles` is a JSON array of 'engineer' | 'checker' | 'admin'. */
export const memberships = sqliteTable(
  'memberships',
  {
    id: id(),
    firmId: firmId(),
    userId: userId('user_id'),
    roles: json<string[]>('roles').notNull(),
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
  expiresAt: time('expires_at').notNull(),
})

export const invitations = sqliteTable('invitations', {
  id: id(),
  firmId: firmId(),
  email: text('email').notNull(),
  roles: json<string[]>('roles').notNull(),
  tokenHash: text('token_hash').notNull().unique(),
  invitedBy: userId('invited_by'),
  expiresAt: time('expires_at').notNull(),
  acceptedAt: time('accepted_at'),
  createdAt: createdAt(),
})

export const passwordResets = sqliteTable('password_resets', {
  id: id(),
  userId: userId('user_id'),
  tokenHash: text('token_hash').notNull().unique(),
  expiresAt: time('expires_at').notNull(),
  usedAt: time('used_at'),
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
    detail: json<Record<string, unknown>>('detail'),
    createdAt: createdAt(),
  },
  (t) => [index('audit_log_firm_idx').on(t.firmId, t.createdAt)],
)

/** Outgoing mail is queued here first, so a mail server that is down never fails the action. */
export const mailOutbox = sqliteTable('mail_outbox', {
  id: id(),
  toAddress: text('to_address').notNull(),
  subject: text('subject').notNull(),
  textBody: text('text_body').notNull(),
  htmlBody: text('html_body').notNull(),
  status: text('status', { enum: ['queued', 'sent', 'failed'] })
    .notNull()
    .default('queued'),
  attempts: integer('attempts').notNull().default(0),
  lastError: text('last_error'),
  nextAttemptAt: time('next_attempt_at').notNull(),
  sentAt: time('sent_at'),
  createdAt: createdAt(),
})

export const projects = sqliteTable(
  'projects',
  {
    id: id(),
    firmId: firmId(),
    name: text('name').notNull(),
    description: text('description').notNull().default(''),
    isDefault: integer('is_default', { mode: 'boolean' }).notNull().default(false),
    /** When the project was archived; null while it is active. */
    archivedAt: time('archived_at'),
    createdBy: text('created_by').references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('projects_firm_idx').on(t.firmId)],
)

export const records = sqliteTable(
  'records',
  {
    id: id(),
    firmId: firmId(),
    projectId: projectId(),
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
    warnings: json<string[]>('warnings').notNull(),
    /** Parsed samples in m/s², little-endian Float64. */
    samples: blob('samples', { mode: 'buffer' }).notNull(),
    synthetic: integer('synthetic', { mode: 'boolean' }).notNull().default(false),
    /** The record this one was processed from; null for a record as received. */
    parentId: text('parent_id').references((): AnySQLiteColumn => records.id),
    /** A processed record's processing as applied, with its chain (shared/schemas/processing.ts). */
    processing: json<Record<string, unknown>>('processing'),
    uploadedBy: userId('uploaded_by'),
    createdAt: createdAt(),
  },
  (t) => [index('records_firm_idx').on(t.firmId, t.projectId), index('records_parent_idx').on(t.parentId)],
)

export const recordPairs = sqliteTable('record_pairs', {
  id: id(),
  firmId: firmId(),
  projectId: projectId(),
  name: text('name').notNull(),
  record1Id: text('record1_id')
    .notNull()
    .references(() => records.id),
  record2Id: text('record2_id')
    .notNull()
    .references(() => records.id),
  ...creation(),
})

export const runs = sqliteTable(
  'runs',
  {
    id: id(),
    firmId: firmId(),
    projectId: projectId(),
    recordId: text('record_id').references(() => records.id),
    pairId: text('pair_id').references(() => recordPairs.id),
    status: text('status', { enum: RUN_STATUSES }).notNull(),
    progress: real('progress').notNull().default(0),
    error: text('error'),
    /** Written from the run request, read back through decodeRunSettings (server/db/parseStored.ts). */
    settings: json<RunSettings>('settings').notNull(),
    creditsCharged: integer('credits_charged').notNull().default(0),
    recordSha256: text('record_sha256').notNull(),
    engineVersion: text('engine_version'),
    timings: json<Record<string, number>>('timings'),
    attempts: integer('attempts').notNull().default(0),
    /** The run this one re-runs after its predecessor was checked and locked. */
    ...revisions(),
    ...creation(),
    startedAt: time('started_at'),
    finishedAt: time('finished_at'),
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
  result: json<Record<string, unknown>>('result').notNull(),
  createdAt: createdAt(),
})

/** Append-only credit ledger; a firm's balance is the sum of its deltas. */
export const creditLedger = sqliteTable(
  'credit_ledger',
  {
    id: integer('id').primaryKey({ autoIncrement: true }),
    firmId: firmId(),
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
    id: id(),
    firmId: firmId(),
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
    ...creation(),
    finishedAt: time('finished_at'),
  },
  (t) => [uniqueIndex('purchases_client_id_unique').on(t.firmId, t.clientPurchaseId)],
)

export const targets = sqliteTable('targets', {
  id: id(),
  firmId: firmId(),
  projectId: projectId(),
  name: text('name').notNull(),
  definition: json<Record<string, unknown>>('definition').notNull(),
  ...creation(),
})

export const comparisons = sqliteTable('comparisons', {
  id: id(),
  firmId: firmId(),
  projectId: projectId(),
  name: text('name').notNull(),
  runIds: json<string[]>('run_ids').notNull(),
  dampingRatio: real('damping_ratio').notNull(),
  target: json<Record<string, unknown>>('target'),
  scaling: json<Record<string, unknown>>('scaling'),
  /** 'arithmetic' or 'geometric': the suite mean drawn and checked against the target. */
  meanKind: text('mean_kind', { enum: ['arithmetic', 'geometric'] })
    .notNull()
    .default('arithmetic'),
  /** For runs of record pairs: which combination of the two components is compared. */
  combination: text('combination', { enum: COMBINATIONS }),
  /** The comparison this one revises after its predecessor was checked and locked. */
  ...revisions(),
  ...creation(),
  updatedAt: time('updated_at'),
})

export const reviews = sqliteTable(
  'reviews',
  {
    id: id(),
    firmId: firmId(),
    subjectType: text('subject_type', { enum: ['run', 'comparison'] }).notNull(),
    subjectId: text('subject_id').notNull(),
    state: text('state', { enum: STORED_REVIEW_STATES }).notNull(),
    submittedBy: userId('submitted_by'),
    submittedAt: time('submitted_at').notNull(),
    decidedBy: text('decided_by').references(() => users.id),
    decidedAt: time('decided_at'),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('reviews_subject_unique').on(t.subjectType, t.subjectId)],
)

export const reviewComments = sqliteTable('review_comments', {
  id: id(),
  reviewId: text('review_id')
    .notNull()
    .references(() => reviews.id),
  authorId: userId('author_id'),
  body: text('body').notNull(),
  createdAt: createdAt(),
})

/** A batch of runs started by one request, with one set of settings (POST /api/run-batches). */
export const runBatches = sqliteTable(
  'run_batches',
  {
    id: id(),
    firmId: firmId(),
    /** The project of its subjects, or null when they span several. */
    projectId: text('project_id').references(() => projects.id),
    settings: json<Record<string, unknown>>('settings').notNull(),
    ...creation(),
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
    id: id(),
    firmId: firmId(),
    userId: userId('user_id'),
    /** The membership it was made under (no foreign key: removing a member deletes the row, and the token dies with it). */
    membershipId: text('membership_id').notNull(),
    name: text('name').notNull(),
    /** At most the member's roles when made; in use, also cut to the member's current roles. */
    roles: json<string[]>('roles').notNull(),
    tokenHash: text('token_hash').notNull().unique(),
    /** The first characters of the secret, to tell tokens apart in lists. */
    hint: text('hint').notNull(),
    expiresAt: time('expires_at'),
    lastUsedAt: time('last_used_at'),
    revokedAt: time('revoked_at'),
    revokedBy: text('revoked_by').references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('api_tokens_firm_idx').on(t.firmId, t.userId)],
)
