import { and, asc, desc, eq, inArray } from 'drizzle-orm'
import type {
  CreatedRunBatch,
  CreateRunBatchBody,
  RunBatch,
  RunBatchCounts,
  RunBatchListQuery,
  RunBatchSummary,
} from '../../shared/schemas/runBatches.js'
import { isFinished, runSettingsSchema, type RunStatus } from '../../shared/schemas/runs.js'
import type { Db, Tx } from '../db/client.js'
import { parseStored } from '../db/parseStored.js'
import { recordPairs, records, runBatches, runBatchRuns, runs, users } from '../db/schema.js'
import { createdByColumns, foldCreatedBy } from '../db/createdBy.js'
import { notFound, paymentRequired } from '../httpError.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { recordAudit } from './audit.js'
import { creditBalance } from './credits.js'
import { getRun, queueRunInTx, resolveRunSettings } from './runs.js'

/**
 * The project of each subject named in `ids`, all of them in the firm's `table`: the first that
 * is not answers 404 naming it (`The record … (recordIds[2])`).
 */
function projectsOf(
  tx: Tx,
  table: typeof records | typeof recordPairs,
  firmId: string,
  ids: readonly string[],
  noun: string,
  field: string,
): string[] {
  if (ids.length === 0) return []
  const found = new Map(
    tx
      .select({ id: table.id, projectId: table.projectId })
      .from(table)
      .where(and(eq(table.firmId, firmId), inArray(table.id, [...ids])))
      .all()
      .map((row) => [row.id, row.projectId]),
  )
  return ids.map((id, i) => {
    const projectId = found.get(id)
    if (projectId === undefined) throw notFound(`The ${noun} ${id} (${field}[${i}])`)
    return projectId
  })
}

/**
 * The projects of a batch's subjects. Every id must name one of the firm's records or pairs:
 * the first that does not answers 404 naming it, before anything is written.
 */
function subjectProjects(tx: Tx, firmId: string, body: CreateRunBatchBody): Set<string> {
  return new Set([
    ...projectsOf(tx, records, firmId, body.recordIds, 'record', 'recordIds'),
    ...projectsOf(tx, recordPairs, firmId, body.pairIds, 'record pair', 'pairIds'),
  ])
}

/**
 * POST /api/run-batches: one queued run per subject (records first, then pairs, in the order
 * given), one credit each. Everything is written in one IMMEDIATE transaction: an unknown or
 * foreign subject (404) or too few credits for all of them (402, with `needed` and `balance`)
 * writes nothing, and concurrent batches can never overspend the balance between them.
 */
export function createRunBatch(db: Db, member: Member, body: CreateRunBatchBody): CreatedRunBatch {
  const settingsInput = {
    dampingRatios: body.dampingRatios,
    periodsS: body.periodsS,
    periodGrid: body.periodGrid,
    method: body.method,
  }
  const recordSettings = resolveRunSettings(settingsInput)
  const pairSettings = { ...recordSettings, combinations: body.combinations ? [...body.combinations] : [] }
  const batchId = newId()
  const runIds = db.transaction(
    (tx) => {
      const projectIds = subjectProjects(tx, member.firmId, body)
      const needed = body.recordIds.length + body.pairIds.length
      const balance = creditBalance(tx, member.firmId)
      if (balance < needed) {
        throw paymentRequired(
          `This batch needs ${needed} run credit${needed === 1 ? '' : 's'} (one per run) and your firm has ${balance}. Nothing was started; an admin can buy more on the Credits page.`,
          'no_credits',
          { needed, balance },
        )
      }
      const [onlyProject] = projectIds.size === 1 ? [...projectIds] : [null]
      tx.insert(runBatches)
        .values({
          id: batchId,
          firmId: member.firmId,
          projectId: onlyProject ?? null,
          settings: pairSettings.combinations.length > 0 ? pairSettings : recordSettings,
          createdBy: member.userId,
          createdAt: Date.now(),
        })
        .run()
      const audit = { batchId }
      const ids = [
        ...body.recordIds.map((recordId) =>
          queueRunInTx(
            tx,
            member,
            { ...settingsInput, subject: { kind: 'record', recordId } },
            recordSettings,
            audit,
          ),
        ),
        ...body.pairIds.map((pairId) =>
          queueRunInTx(
            tx,
            member,
            { ...settingsInput, subject: { kind: 'pair', pairId, combinations: pairSettings.combinations } },
            pairSettings,
            audit,
          ),
        ),
      ]
      tx.insert(runBatchRuns)
        .values(ids.map((runId, position) => ({ batchId, runId, position })))
        .run()
      recordAudit(tx, {
        firmId: member.firmId,
        userId: member.userId,
        action: 'run_batch.created',
        subjectType: 'run_batch',
        subjectId: batchId,
        detail: { records: body.recordIds.length, pairs: body.pairIds.length, runIds: ids },
      })
      return ids
    },
    { behavior: 'immediate' },
  )
  return { id: batchId, runIds }
}

const batchColumns = {
  id: runBatches.id,
  projectId: runBatches.projectId,
  settings: runBatches.settings,
  ...createdByColumns(runBatches.createdBy),
  createdAt: runBatches.createdAt,
}

function selectBatches(db: Tx) {
  return db.select(batchColumns).from(runBatches).innerJoin(users, eq(users.id, runBatches.createdBy))
}

type BatchRow = Awaited<ReturnType<ReturnType<typeof selectBatches>['all']>>[number]

const emptyCounts = (): RunBatchCounts => ({ queued: 0, running: 0, succeeded: 0, failed: 0 })

/** Summaries of the given batches (their runs' subjects and states), in the rows' order. */
function summarise(db: Tx, rows: BatchRow[]): RunBatchSummary[] {
  if (rows.length === 0) return []
  const members = db
    .select({
      batchId: runBatchRuns.batchId,
      status: runs.status,
      recordId: runs.recordId,
      pairId: runs.pairId,
    })
    .from(runBatchRuns)
    .innerJoin(runs, eq(runs.id, runBatchRuns.runId))
    .where(
      inArray(
        runBatchRuns.batchId,
        rows.map((r) => r.id),
      ),
    )
    .orderBy(asc(runBatchRuns.batchId), asc(runBatchRuns.position))
    .all()
  return rows.map((row) => {
    const own = members.filter((m) => m.batchId === row.id)
    const counts = emptyCounts()
    for (const m of own) counts[m.status as RunStatus]++
    return {
      ...foldCreatedBy(row),
      settings: parseStored(runSettingsSchema, row.settings, 'batch settings'),
      recordIds: own.flatMap((m) => (m.recordId ? [m.recordId] : [])),
      pairIds: own.flatMap((m) => (m.pairId ? [m.pairId] : [])),
      counts,
      finished: own.every((m) => isFinished(m.status)),
    }
  })
}

/** The firm's batches, newest first, optionally of one project. */
export function listRunBatches(
  db: Db,
  firmId: string,
  query: RunBatchListQuery,
  limit = 100,
): RunBatchSummary[] {
  const rows = selectBatches(db)
    .where(
      and(
        eq(runBatches.firmId, firmId),
        query.projectId ? eq(runBatches.projectId, query.projectId) : undefined,
      ),
    )
    .orderBy(desc(runBatches.createdAt), desc(runBatches.id))
    .limit(limit)
    .all()
  return summarise(db, rows)
}

/** GET /api/run-batches/:id: one of the firm's batches with its runs in order; another firm's id answers 404. */
export function getRunBatch(db: Db, firmId: string, batchId: string): RunBatch {
  const row = selectBatches(db)
    .where(and(eq(runBatches.firmId, firmId), eq(runBatches.id, batchId)))
    .get()
  if (!row) throw notFound('The run batch')
  const [summary] = summarise(db, [row])
  const runIds = db
    .select({ runId: runBatchRuns.runId })
    .from(runBatchRuns)
    .where(eq(runBatchRuns.batchId, batchId))
    .orderBy(asc(runBatchRuns.position))
    .all()
  return { ...summary!, runs: runIds.map((r) => getRun(db, firmId, r.runId)) }
}
