/**
 * The embedded run queue's persistence: the runs table is the queue. Claims, progress and
 * outcomes are guarded by the claimed attempt number, and every write that moves credits runs
 * in one IMMEDIATE transaction with the run row it pays for.
 */
import { and, asc, eq, sql } from 'drizzle-orm'
import type { Db, Tx } from '../db/client.js'
import { decodeRunSettings } from '../db/parseStored.js'
import { recordPairs, records, runs, spectra } from '../db/schema.js'
import { recordAudit } from '../services/audit.js'
import { returnRunCredit } from '../services/credits.js'
import { decodeSamples } from '../services/sampleBlob.js'
import type { SpectrumJob } from '../../shared/schemas/spectrumWorker.js'
import type { ClaimedRun, RunStore, RunTimings, WorkerResult } from './runStore.js'
import { storedSpectrum } from './storedSpectrum.js'

/** How many times a run may be started before a crash-looping run is failed instead of retried. */
export const MAX_RUN_ATTEMPTS = 3

/** The run store of one SQLite database. */
export function sqliteRunStore(db: Db): RunStore {
  return {
    recover: () => requeueInterruptedRuns(db),
    claim: () => claimNextRun(db),
    hasWaiting: () =>
      db.select({ id: runs.id }).from(runs).where(eq(runs.status, 'queued')).limit(1).get() !== undefined,
    load: (run) => loadRunJob(db, run),
    putBack: (run) =>
      db
        .update(runs)
        .set({ status: 'queued', progress: 0, startedAt: null, attempts: run.attempt - 1 })
        .where(owns(run))
        .run().changes === 1,
    progress: (run, progress) => {
      db.update(runs).set({ progress }).where(owns(run)).run()
    },
    succeed: (run, reply, timings) => completeRun(db, run, reply, timings),
    running: () =>
      db
        .select(claimedColumns)
        .from(runs)
        .where(eq(runs.status, 'running'))
        .orderBy(asc(runs.createdAt), asc(sql`rowid`))
        .all()
        .map((row) => ({
          ...row,
          settings: decodeRunSettings(row.settings),
          startedAt: row.startedAt ?? row.createdAt,
        })),
    retry: (run, why) =>
      db.transaction(
        (tx) => {
          if (!tx.select({ id: runs.id }).from(runs).where(owns(run)).get()) return 'gone'
          if (run.attempt >= MAX_RUN_ATTEMPTS) {
            failInTx(
              tx,
              run.id,
              run.firmId,
              `The run was interrupted ${run.attempt} times and was stopped (${why}).`,
            )
            return 'failed'
          }
          tx.update(runs).set({ status: 'queued', progress: 0, startedAt: null }).where(owns(run)).run()
          return 'queued'
        },
        { behavior: 'immediate' },
      ),
    fail: (run, message) =>
      db.transaction(
        (tx) => {
          if (!tx.select({ id: runs.id }).from(runs).where(owns(run)).get()) return false
          failInTx(tx, run.id, run.firmId, message)
          return true
        },
        { behavior: 'immediate' },
      ),
  }
}

/** The columns of a run as the queue holds it once claimed. */
const claimedColumns = {
  id: runs.id,
  firmId: runs.firmId,
  recordId: runs.recordId,
  pairId: runs.pairId,
  settings: runs.settings,
  attempt: runs.attempts,
  createdAt: runs.createdAt,
  startedAt: runs.startedAt,
}

const owns = (run: Pick<ClaimedRun, 'id' | 'attempt'>) =>
  and(eq(runs.id, run.id), eq(runs.status, 'running'), eq(runs.attempts, run.attempt))

/**
 * Runs left `running` by a crash or a restart go back to the queue, unless they were already
 * started MAX_RUN_ATTEMPTS times (then they fail and their credit is returned).
 */
function requeueInterruptedRuns(db: Db): { requeued: number; failed: number } {
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
function claimNextRun(db: Db): ClaimedRun | undefined {
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
        .returning(claimedColumns)
        .get()
      return row ? { ...row, settings: decodeRunSettings(row.settings), startedAt } : undefined
    },
    { behavior: 'immediate' },
  )
}

/** One stored record's Δt and samples. */
function recordSamples(db: Db, firmId: string, recordId: string) {
  const row = db
    .select({ dtS: records.dtS, samples: records.samples })
    .from(records)
    .where(and(eq(records.firmId, firmId), eq(records.id, recordId)))
    .get()
  return row && { dtS: row.dtS, samples: decodeSamples(row.samples).buffer as ArrayBuffer }
}

/** Loads the samples of a claimed run's record (or pair). Throws with a message when a record is gone. */
function loadRunJob(db: Db, run: ClaimedRun): SpectrumJob {
  if (run.recordId) {
    const record = recordSamples(db, run.firmId, run.recordId)
    if (!record) throw new Error('The record of this run no longer exists.')
    return { kind: 'record', ...record }
  }
  if (!run.pairId) throw new Error('This run has neither a record nor a record pair.')
  const pair = db
    .select({ record1Id: recordPairs.record1Id, record2Id: recordPairs.record2Id })
    .from(recordPairs)
    .where(and(eq(recordPairs.firmId, run.firmId), eq(recordPairs.id, run.pairId)))
    .get()
  if (!pair) throw new Error('The record pair of this run no longer exists.')
  const first = recordSamples(db, run.firmId, pair.record1Id)
  const second = recordSamples(db, run.firmId, pair.record2Id)
  if (!first || !second) throw new Error('A record of this run’s pair no longer exists.')
  return { kind: 'pair', dtS: first.dtS, samples1: first.samples, samples2: second.samples }
}

/**
 * Stores the spectrum and marks the run succeeded in one transaction; the credit reserved at
 * creation is now spent. Returns false (and writes nothing) when this attempt no longer owns
 * the run, so a run finishes exactly once.
 */
function completeRun(db: Db, run: ClaimedRun, reply: WorkerResult, timings: RunTimings): boolean {
  const result = storedSpectrum(db, run, reply)
  const engineVersion = reply.computation.methodStatement.engineVersion
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
          engineVersion,
          timings: { ...timings },
          finishedAt,
        })
        .where(owns(run))
        .run()
      if (updated.changes !== 1) return false
      tx.insert(spectra).values({ runId: run.id, result, createdAt: finishedAt }).run()
      recordAudit(tx, {
        firmId: run.firmId,
        action: 'run.succeeded',
        subjectType: 'run',
        subjectId: run.id,
        detail: { timings: { ...timings }, engineVersion },
      })
      return true
    },
    { behavior: 'immediate' },
  )
}

function failInTx(tx: Tx, runId: string, firmId: string, message: string) {
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
