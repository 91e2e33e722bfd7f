import { and, eq } from 'drizzle-orm'
import type { WorkerReply } from '../../shared/schemas/spectrumWorker.js'
import type { Db } from '../db/client.js'
import { records } from '../db/schema.js'
import type { ClaimedRun } from '../services/runs.js'

type WorkerResult = Extract<WorkerReply, { type: 'result' }>

/**
 * The spectrum row of a finished run: the engine's JSON shape of the computation the worker
 * posted, labelled with the record it came from.
 */
export function storedSpectrum(db: Db, run: ClaimedRun, reply: WorkerResult): Record<string, unknown> {
  const record = run.recordId
    ? db
        .select({
          name: records.name,
          sha256: records.sha256,
          sourceFileName: records.sourceFileName,
          points: records.points,
          dtS: records.dtS,
        })
        .from(records)
        .where(and(eq(records.firmId, run.firmId), eq(records.id, run.recordId)))
        .get()
    : undefined
  if (!record) throw new Error('The record of this run no longer exists.')
  const c = reply.computation
  return {
    engineVersion: c.methodStatement.engineVersion,
    record,
    methodStatement: c.methodStatement,
    periodsS: Array.from(c.periodsS),
    curves: c.curves.map((curve) => ({
      dampingRatio: curve.dampingRatio,
      sdM: Array.from(curve.sdM),
      svMPerS: Array.from(curve.svMPerS),
      saMPerS2: Array.from(curve.saMPerS2),
      psvMPerS: Array.from(curve.psvMPerS),
      psaMPerS2: Array.from(curve.psaMPerS2),
    })),
    warnings: c.warnings,
  }
}
