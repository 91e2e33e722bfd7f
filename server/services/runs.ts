import { and, asc, desc, eq, sql, type SQL } from 'drizzle-orm'
import {
  type CreatePairRunBody,
  type CreateRunBody,
  type Run,
  type RunListQuery,
  type RunSettings,
} from '../../shared/schemas/runs.js'
import type { SpectrumResult } from '../../shared/schemas/spectrum.js'
import type { SpectrumJob } from '../../shared/schemas/spectrumWorker.js'
import { defaultPeriodsS, logPeriodGrid } from '../../shared/spectra/periods.js'
import type { Db, Tx } from '../db/client.js'
import { recordPairs, records, runs, spectra, users } from '../db/schema.js'
import { badRequest, conflict, notFound } from '../httpError.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { recordAudit } from './audit.js'
import { reviewStateOf, reviewStates } from './reviews.js'
import { decodeSamples } from './sampleBlob.js'
import { reserveRunCredit, returnRunCredit } from './credits.js'

/** Turns the request's settings into the settings the run is computed with (periods resolved). */
export function resolveRunSettings(input: Omit<CreateRunBody, 'recordId'>): RunSettings {
  const base = { method: input.method, dampingRatios: [...input.dampingRatios] }
  if (input.periodsS)
    return { ...base, periodsS: [...input.periodsS], periodChoice: 'list', periodGrid: null }
  if (input.periodGrid) {
    const { minS, maxS, count } = input.periodGrid
    return {
      ...base,
      periodsS: Array.from(logPeriodGrid(minS, maxS, count)),
      periodChoice: 'grid',
      periodGrid: { minS, maxS, count },
    }
  }
  return { ...base, periodsS: Array.from(defaultPeriodsS()), periodChoice: 'default', periodGrid: null }
}

const runColumns = {
  id: runs.id,
  projectId: runs.projectId,
  recordId: runs.recordId,
  pairId: runs.pairId,
  subjectName: sql<string>`coalesce(${records.name}, ${recordPairs.name}, '')`,
  status: runs.status,
  progress: runs.progress,
  error: runs.error,
  settings: runs.settings,
  creditsCharged: runs.creditsCharged,
  recordSha256: runs.recordSha256,
  engineVersion: runs.engineVersion,
  timings: runs.timings,
  createdById: runs.createdBy,
  createdByName: users.name,
  createdAt: runs.createdAt,
  startedAt: runs.startedAt,
  finishedAt: runs.finishedAt,
  revision: runs.revision,
  revisionOf: runs.revisionOf,
}

function selectRuns(db: Tx, where: SQL | undefined) {
  return db
    .select(runColumns)
    .from(runs)
    .innerJoin(users, eq(users.id, runs.createdBy))
    .leftJoin(records, eq(records.id, runs.recordId))
    .leftJoin(recordPairs, eq(recordPairs.id, runs.pairId))
    .where(where)
}

type RunRow = Awaited<ReturnType<ReturnType<typeof selectRuns>['all']>>[number]

function toRun({ createdById, createdByName, ...row }: RunRow, reviewState: Run['reviewState']): Run {
  return {
    ...row,
    settings: row.settings as RunSettings,
    createdBy: { id: createdById, name: createdByName },
    reviewState,
  }
}

/** The firm's runs, newest first, optionally for one project or one record. */
export function listRuns(db: Db, firmId: string, query: RunListQuery, limit = 500): Run[] {
  const where = and(
    eq(runs.firmId, firmId),
    query.projectId ? eq(runs.projectId, query.projectId) : undefined,
    query.recordId ? eq(runs.recordId, query.recordId) : undefined,
  )
  const rows = selectRuns(db, where).orderBy(desc(runs.createdAt), desc(runs.id)).limit(limit).all()
  const states = reviewStates(
    db,
    firmId,
    'run',
    rows.map((r) => r.id),
  )
  return rows.map((row) => toRun(row, states.get(row.id) ?? 'draft'))
}

/** One of the firm's runs; another firm's id answers 404. */
export function getRun(db: Tx, firmId: string, runId: string): Run {
  const row = selectRuns(db, and(eq(runs.firmId, firmId), eq(runs.id, runId))).get()
  if (!row) throw notFound('The run')
  return toRun(row, reviewStateOf(db, firmId, 'run', runId))
}

/** The record or pair a new run computes, as its row and its audit row need it. */
interface RunSubject {
  projectId: string
  recordId: string | null
  pairId: string | null
  /** The record's SHA-256; for a pair, both components' joined by "+". */
  sha256: string
  auditDetail: Record<string, unknown>
}

function runSubject(tx: Tx, firmId: string, body: CreateRunBody | CreatePairRunBody): RunSubject {
  if ('recordId' in body) {
    const record = tx
      .select({ projectId: records.projectId, sha256: records.sha256, name: records.name })
      .from(records)
      .where(and(eq(records.firmId, firmId), eq(records.id, body.recordId)))
      .get()
    if (!record) throw notFound('The record')
    const { projectId, sha256, name } = record
    return {
      projectId,
      recordId: body.recordId,
      pairId: null,
      sha256,
      auditDetail: { recordId: body.recordId, recordName: name },
    }
  }
  const pair = tx
    .select({
      projectId: recordPairs.projectId,
      name: recordPairs.name,
      record1Id: recordPairs.record1Id,
      record2Id: recordPairs.record2Id,
    })
    .from(recordPairs)
    .where(and(eq(recordPairs.firmId, firmId), eq(recordPairs.id, body.pairId)))
    .get()
  if (!pair) throw notFound('The record pair')
  const hashes = [pair.record1Id, pair.record2Id].map((id) => {
    const row = tx
      .select({ sha256: records.sha256 })
      .from(records)
      .where(and(eq(records.firmId, firmId), eq(records.id, id)))
      .get()
    if (!row) throw notFound('A record of the pair')
    return row.sha256
  })
  return {
    projectId: pair.projectId,
    recordId: null,
    pairId: body.pairId,
    sha256: hashes.join('+'),
    auditDetail: {
      pairId: body.pairId,
      pairName: pair.name,
      combinations: 'combinations' in body ? body.combinations : [],
    },
  }
}

/** The revision of a re-run: one more than the run it revises, which must be of the same record or pair. */
function runRevision(
  tx: Tx,
  firmId: string,
  revisionOf: string | undefined,
  subject: RunSubject,
): number {
  if (!revisionOf) return 1
  const previous = tx
    .select({ revision: runs.revision, recordId: runs.recordId, pairId: runs.pairId })
    .from(runs)
    .where(and(eq(runs.firmId, firmId), eq(runs.id, revisionOf)))
    .get()
  if (!previous) throw notFound('The run to revise')
  if (previous.recordId !== subject.recordId || previous.pairId !== subject.pairId) {
    throw badRequest(
      'A revision must run the same record or pair as the run it revises.',
      'revision_subject_mismatch',
    )
  }
  return previous.revision + 1
}

/**
 * Writes one queued run of a record or pair: the run row, its reserved credit and its audit
 * row. Call inside an IMMEDIATE transaction (createRun, and run batches for many at once), so a
 * refusal (404, 402) part-way leaves nothing behind. Returns the new run's id.
 */
export function queueRunInTx(
  tx: Tx,
  member: Member,
  body: CreateRunBody | CreatePairRunBody,
  settings: RunSettings,
  audit: Record<string, unknown> = {},
): string {
  const runId = newId()
  const subject = runSubject(tx, member.firmId, body)
  const revision = runRevision(tx, member.firmId, body.revisionOf, subject)
  tx.insert(runs)
    .values({
      id: runId,
      firmId: member.firmId,
      projectId: subject.projectId,
      recordId: subject.recordId,
      pairId: subject.pairId,
      status: 'queued',
      progress: 0,
      settings,
      recordSha256: subject.sha256,
      revision,
      revisionOf: body.revisionOf ?? null,
      createdBy: member.userId,
      createdAt: Date.now(),
    })
    .run()
  reserveRunCredit(tx, member.firmId, runId, member.userId)
  recordAudit(tx, {
    firmId: member.firmId,
    userId: member.userId,
    action: 'run.created',
    subjectType: 'run',
    subjectId: runId,
    detail: {
      ...subject.auditDetail,
      method: settings.method,
      dampingRatios: settings.dampingRatios,
      periods: settings.periodsS.length,
      ...(body.revisionOf ? { revisionOf: body.revisionOf, revision } : {}),
      ...audit,
    },
  })
  return runId
}

/**
 * Queues a run of one record, or of a record pair with its combinations (one credit either way).
 * The run row, the reserved credit and the audit row are written in one IMMEDIATE transaction,
 * so concurrent requests can never spend the same last credit and a refused request (404, 402)
 * leaves nothing behind.
 */
export function createRun(db: Db, member: Member, body: CreateRunBody | CreatePairRunBody): Run {
  const settings = resolveRunSettings(body)
  if ('combinations' in body) settings.combinations = [...body.combinations]
  const runId = db.transaction((tx) => queueRunInTx(tx, member, body, settings), { behavior: 'immediate' })
  return getRun(db, member.firmId, runId)
}

/** The stored spectrum of a succeeded run, with the run's settings under `settings`. */
export function getRunSpectrum(
  db: Db,
  firmId: string,
  runId: string,
): { run: Run; result: Record<string, unknown> } {
  const run = getRun(db, firmId, runId)
  if (run.status !== 'succeeded') {
    throw conflict(
      run.status === 'failed'
        ? 'This run failed, so it has no spectrum. Start a new run.'
        : 'This run has not finished yet; its spectrum is available once it succeeds.',
      'run_not_finished',
    )
  }
  const row = db.select({ result: spectra.result }).from(spectra).where(eq(spectra.runId, runId)).get()
  if (!row) throw notFound('The spectrum of this run')
  return { run, result: row.result }
}

// ---- The queue side: the runs table is the queue. -------------------------------------------

/** A run taken off the queue, with the attempt number that owns it. */
export interface ClaimedRun {
  id: string
  firmId: string
  recordId: string | null
  pairId: string | null
  settings: RunSettings
  attempt: number
  createdAt: number
  startedAt: number
}

/** How many times a run may be started before a crash-looping run is failed instead of retried. */
export const MAX_RUN_ATTEMPTS = 3

/**
 * At start, runs left `running` by a crash or a restart go back to the queue, unless they were
 * already started MAX_RUN_ATTEMPTS times (then they fail and their credit is returned).
 * Returns how many were queued again and how many were failed.
 */
export function requeueInterruptedRuns(db: Db): { requeued: number; failed: number } {
  return db.transaction(
    (tx) => {
      const stuck = tx
        .select({ id: runs.id, firmId: runs.firmId, attempts: runs.attempts })
        .from(runs)
        .where(eq(runs.status, 'running'))
        .all()
      let failed = 0
      for (const r of stuck) {
        if (r.attempts >= MAX_RUN_ATTEMPTS) {
          failInTx(tx, r.id, r.firmId, `The run was interrupted ${r.attempts} times and was stopped.`)
          failed++
        } else {
          tx.update(runs)
            .set({ status: 'queued', progress: 0, startedAt: null })
            .where(and(eq(runs.id, r.id), eq(runs.status, 'running')))
            .run()
        }
      }
      return { requeued: stuck.length - failed, failed }
    },
    { behavior: 'immediate' },
  )
}

/** Takes the oldest queued run and marks it running, in one transaction. */
export function claimNextRun(db: Db): ClaimedRun | undefined {
  return db.transaction(
    (tx) => {
      const next = tx
        .select({ id: runs.id })
        .from(runs)
        .where(eq(runs.status, 'queued'))
        .orderBy(asc(runs.createdAt), asc(sql`rowid`))
        .limit(1)
        .get()
      if (!next) return undefined
      const startedAt = Date.now()
      const row = tx
        .update(runs)
        .set({ status: 'running', progress: 0, startedAt, attempts: sql`${runs.attempts} + 1` })
        .where(and(eq(runs.id, next.id), eq(runs.status, 'queued')))
        .returning({
          id: runs.id,
          firmId: runs.firmId,
          recordId: runs.recordId,
          pairId: runs.pairId,
          settings: runs.settings,
          attempt: runs.attempts,
          createdAt: runs.createdAt,
        })
        .get()
      return row ? { ...row, settings: row.settings as RunSettings, startedAt } : undefined
    },
    { behavior: 'immediate' },
  )
}

/** Whether any run is waiting in the queue (the queue splits a run only when none is). */
export function hasQueuedRuns(db: Db): boolean {
  return db.select({ id: runs.id }).from(runs).where(eq(runs.status, 'queued')).limit(1).get() !== undefined
}

const owns = (run: Pick<ClaimedRun, 'id' | 'attempt'>) =>
  and(eq(runs.id, run.id), eq(runs.status, 'running'), eq(runs.attempts, run.attempt))

/** What a worker needs for a claimed run, with the buffers to transfer rather than copy. */
export interface RunJob {
  job: SpectrumJob
  transfer: ArrayBuffer[]
}

/** Loads the samples of a claimed run's record (or pair). Throws with a message when a record is gone. */
export function loadRunJob(db: Db, run: ClaimedRun): RunJob {
  if (run.pairId) return loadPairJob(db, run.firmId, run.pairId)
  if (!run.recordId) throw new Error('This run has neither a record nor a record pair.')
  const record = db
    .select({ dtS: records.dtS, samples: records.samples })
    .from(records)
    .where(and(eq(records.firmId, run.firmId), eq(records.id, run.recordId)))
    .get()
  if (!record) throw new Error('The record of this run no longer exists.')
  const samples = decodeSamples(record.samples).buffer as ArrayBuffer
  return { job: { kind: 'record', dtS: record.dtS, samples }, transfer: [samples] }
}

function loadPairJob(db: Db, firmId: string, pairId: string): RunJob {
  const pair = db
    .select({ record1Id: recordPairs.record1Id, record2Id: recordPairs.record2Id })
    .from(recordPairs)
    .where(and(eq(recordPairs.firmId, firmId), eq(recordPairs.id, pairId)))
    .get()
  if (!pair) throw new Error('The record pair of this run no longer exists.')
  const [first, second] = [pair.record1Id, pair.record2Id].map((id) => {
    const row = db
      .select({ dtS: records.dtS, samples: records.samples })
      .from(records)
      .where(and(eq(records.firmId, firmId), eq(records.id, id)))
      .get()
    if (!row) throw new Error('A record of this run’s pair no longer exists.')
    return { dtS: row.dtS, samples: decodeSamples(row.samples).buffer as ArrayBuffer }
  })
  if (!first || !second) throw new Error('The record pair of this run is incomplete.')
  return {
    job: { kind: 'pair', dtS: first.dtS, samples1: first.samples, samples2: second.samples },
    transfer: [first.samples, second.samples],
  }
}

/** Stores a running run's progress (0–1); ignored once the run is no longer this attempt's. */
export function recordRunProgress(db: Db, run: Pick<ClaimedRun, 'id' | 'attempt'>, progress: number): void {
  db.update(runs).set({ progress }).where(owns(run)).run()
}

export interface RunOutcome {
  result: SpectrumResult
  engineVersion: string
  timings: Record<string, number>
}

/**
 * Stores the spectrum and marks the run succeeded in one transaction; the credit reserved at
 * creation is now spent. Returns false (and writes nothing) when this attempt no longer owns
 * the run, so a run finishes exactly once.
 */
export function completeRun(db: Db, run: ClaimedRun, outcome: RunOutcome): boolean {
  return db.transaction(
    (tx) => {
      const finishedAt = Date.now()
      const updated = tx
        .update(runs)
        .set({
          status: 'succeeded',
          progress: 1,
          error: null,
          creditsCharged: 1,
          engineVersion: outcome.engineVersion,
          timings: outcome.timings,
          finishedAt,
        })
        .where(owns(run))
        .run()
      if (updated.changes !== 1) return false
      tx.insert(spectra).values({ runId: run.id, result: outcome.result, createdAt: finishedAt }).run()
      recordAudit(tx, {
        firmId: run.firmId,
        action: 'run.succeeded',
        subjectType: 'run',
        subjectId: run.id,
        detail: { timings: outcome.timings, engineVersion: outcome.engineVersion },
      })
      return true
    },
    { behavior: 'immediate' },
  )
}

function failInTx(
  tx: Tx,
  runId: string,
  firmId: string,
  message: string,
) {
  tx.update(runs)
    .set({ status: 'failed', error: message, creditsCharged: 0, finishedAt: Date.now() })
    .where(eq(runs.id, runId))
    .run()
  returnRunCredit(tx, firmId, runId, message)
  recordAudit(tx, {
    firmId,
    action: 'run.failed',
    subjectType: 'run',
    subjectId: runId,
    detail: { error: message },
  })
}

/**
 * Fails a running run with a message and returns its credit, in one transaction. Returns false
 * when this attempt no longer owns the run (it finished already, or was queued again).
 */
export function failRun(db: Db, run: ClaimedRun, message: string): boolean {
  return db.transaction(
    (tx) => {
      const current = tx.select({ id: runs.id }).from(runs).where(owns(run)).get()
      if (!current) return false
      failInTx(tx, run.id, run.firmId, message)
      return true
    },
    { behavior: 'immediate' },
  )
}

/** Puts a running run back in the queue (graceful shutdown); the attempt does not count. */
export function requeueRun(db: Db, run: ClaimedRun): boolean {
  const res = db
    .update(runs)
    .set({ status: 'queued', progress: 0, startedAt: null, attempts: run.attempt - 1 })
    .where(owns(run))
    .run()
  return res.changes === 1
}
