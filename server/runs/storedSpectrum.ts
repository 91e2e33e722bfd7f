import { and, eq } from 'drizzle-orm'
import type { SpectrumResult } from '../../shared/schemas/spectrum.js'
import type { WorkerReply } from '../../shared/schemas/spectrumWorker.js'
import { toSpectrumJson } from '../../shared/spectra/toSpectrumJson.js'
import { isSourceUnits } from '../../shared/spectra/units.js'
import type { Db } from '../db/client.js'
import { records } from '../db/schema.js'
import type { ClaimedRun } from './runStore.js'
import { recordSummaryColumns } from './recordSummaryColumns.js'
import { storedPairSpectrum } from './storedPairSpectrum.js'

type WorkerResult = Extract<WorkerReply, { type: 'result' | 'pair-result' }>

/**
 * The spectrum row of a finished run: the engine's JSON of the computation the worker posted
 * (the same function the command line uses), with the record's parameters and warnings.
 */
export function storedSpectrum(db: Db, run: ClaimedRun, reply: WorkerResult): SpectrumResult {
  if (reply.type === 'pair-result') return storedPairSpectrum(db, run, reply.computation)
  const record = run.recordId
    ? db
        .select(recordSummaryColumns)
        .from(records)
        .where(and(eq(records.firmId, run.firmId), eq(records.id, run.recordId)))
        .get()
    : undefined
  if (!record) throw new Error('The record of this run no longer exists.')
  const { warnings, sourceUnits, ...parameters } = record
  if (!isSourceUnits(sourceUnits)) throw new Error(`The record's units "${sourceUnits}" are not known.`)
  return toSpectrumJson({ ...parameters, sourceUnits }, reply.computation, warnings)
}
