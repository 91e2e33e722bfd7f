import { and, desc, eq, sql, type SQL } from 'drizzle-orm'
import type {
  CreateRunBody,
  Run,
  RunListQuery,
  RunRequest,
  RunSettings,
  RunSubject,
} from '../../shared/schemas/runs.js'
import { defaultPeriodsS, logPeriodGrid } from '../../shared/spectra/periods.js'
import type { Db, Tx } from '../db/client.js'
import { decodeRunSettings, decodeSpectrumResult, type StoredSpectrumResult } from '../db/parseStored.js'
import { recordPairs, records, runs, spectra, users } from '../db/schema.js'
import { createdByColumns, foldCreatedBy } from '../db/createdBy.js'
import { badRequest, conflict, notFound } from '../httpError.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { recordAudit } from './audit.js'
import { reserveRunCredit } from './credits.js'
import { resolveOpenProject } from './projects.js'
import { runsOfRecordCondition } from './records.js'
import { reviewStateOf, reviewStates } from './reviews.js'

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
  ...createdByColumns(runs.createdBy),
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

function toRun(row: RunRow, reviewState: Run['reviewState']): Run {
  return { ...foldCreatedBy(row), settings: decodeRunSettings(row.settings), reviewState }
}

/** The firm's runs, newest first, optionally for one project or one record (with its pairs' runs). */
export function listRuns(db: Db, firmId: string, query: RunListQuery, limit = 500): Run[] {
  const where = and(
    eq(runs.firmId, firmId),
    query.projectId ? eq(runs.projectId, query.projectId) : undefined,
    query.recordId ? runsOfRecordCondition(db, firmId, query.recordId) : undefined,
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
interface SubjectRow {
  projectId: string
  recordId: string | null
  pairId: string | null
  /** The record's SHA-256; for a pair, both components' joined by "+". */
  sha256: string
  auditDetail: Record<string, unknown>
}

function recordRow(tx: Tx, firmId: string, recordId: string) {
  return tx
    .select({ projectId: records.projectId, sha256: records.sha256, name: records.name })
    .from(records)
    .where(and(eq(records.firmId, firmId), eq(records.id, recordId)))
    .get()
}

function subjectRow(tx: Tx, firmId: string, subject: RunSubject): SubjectRow {
  switch (subject.kind) {
    case 'record': {
      const record = recordRow(tx, firmId, subject.recordId)
      if (!record) throw notFound('The record')
      return {
        projectId: record.projectId,
        recordId: subject.recordId,
        pairId: null,
        sha256: record.sha256,
        auditDetail: { recordId: subject.recordId, recordName: record.name },
      }
    }
    case 'pair': {
      const pair = tx
        .select({
          projectId: recordPairs.projectId,
          name: recordPairs.name,
          record1Id: recordPairs.record1Id,
          record2Id: recordPairs.record2Id,
        })
        .from(recordPairs)
        .where(and(eq(recordPairs.firmId, firmId), eq(recordPairs.id, subject.pairId)))
        .get()
      if (!pair) throw notFound('The record pair')
      const hashes = [pair.record1Id, pair.record2Id].map((id) => {
        const record = recordRow(tx, firmId, id)
        if (!record) throw notFound('A record of the pair')
        return record.sha256
      })
      return {
        projectId: pair.projectId,
        recordId: null,
        pairId: subject.pairId,
        sha256: hashes.join('+'),
        auditDetail: { pairId: subject.pairId, pairName: pair.name, combinations: subject.combinations },
      }
    }
  }
}

/** The revision of a re-run: one more than the run it revises, which must be of the same record or pair. */
function runRevision(tx: Tx, firmId: string, revisionOf: string | undefined, subject: SubjectRow): number {
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
  request: RunRequest,
  settings: RunSettings,
  audit: Record<string, unknown> = {},
): string {
  const runId = newId()
  const subject = subjectRow(tx, member.firmId, request.subject)
  resolveOpenProject(tx, member.firmId, subject.projectId, 'runs')
  const revision = runRevision(tx, member.firmId, request.revisionOf, subject)
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
      revisionOf: request.revisionOf ?? null,
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
      ...(request.revisionOf ? { revisionOf: request.revisionOf, revision } : {}),
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
export function createRun(db: Db, member: Member, request: RunRequest): Run {
  const settings = resolveRunSettings(request)
  if (request.subject.kind === 'pair') settings.combinations = [...request.subject.combinations]
  const runId = db.transaction((tx) => queueRunInTx(tx, member, request, settings), { behavior: 'immediate' })
  return getRun(db, member.firmId, runId)
}

/** The stored spectrum of a succeeded run, with the run's settings under `settings`. */
export function getRunSpectrum(
  db: Db,
  firmId: string,
  runId: string,
): { run: Run; result: StoredSpectrumResult } {
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
  return { run, result: decodeSpectrumResult(row.result) }
}
