import { and, eq } from 'drizzle-orm'
import type { SpectrumRecordSummary, SpectrumResult } from '../../shared/schemas/spectrum.js'
import type { WorkerReply } from '../../shared/schemas/spectrumWorker.js'
import { toSpectrumJson } from '../../shared/spectra/toSpectrumJson.js'
import { isSourceUnits } from '../../shared/spectra/units.js'
import type { Db } from '../db/client.js'
import { recordPairs, records } from '../db/schema.js'
import type { ClaimedRun } from './runStore.js'
import { recordSummaryColumns } from './recordSummaryColumns.js'

type WorkerResult = Extract<WorkerReply, { type: 'result' }>

/** A pair's component as its spectrum JSON names it. */
export type SpectrumComponent = SpectrumRecordSummary & { name: string; sha256: string }

/** The spectrum JSON of a run: a pair run's also names the pair and both components. */
export type StoredSpectrum = SpectrumResult & {
  pair?: { id: string; name: string; components: SpectrumComponent[] }
}

/** One record of the run's firm, with its name, hash, parameters and warnings. */
function readRecord(db: Db, firmId: string, recordId: string) {
  const row = db
    .select({ name: records.name, sha256: records.sha256, ...recordSummaryColumns })
    .from(records)
    .where(and(eq(records.firmId, firmId), eq(records.id, recordId)))
    .get()
  if (!row) return undefined
  const { sourceUnits, warnings, ...rest } = row
  if (!isSourceUnits(sourceUnits)) throw new Error(`The record's units "${sourceUnits}" are not known.`)
  return { component: { ...rest, sourceUnits }, warnings }
}

/**
 * The spectrum row of a finished run: the engine's JSON of the computation the worker posted
 * (the same function the command line uses), with the record's parameters and warnings first.
 * For a pair run, `record` holds the first component's parameters (the schema has one record),
 * `pair.components` both, and each component's warnings are prefixed by its name.
 */
export function storedSpectrum(db: Db, run: ClaimedRun, reply: WorkerResult): StoredSpectrum {
  const { computation } = reply
  if (run.pairId) {
    const pair = db
      .select({ name: recordPairs.name, record1Id: recordPairs.record1Id, record2Id: recordPairs.record2Id })
      .from(recordPairs)
      .where(and(eq(recordPairs.firmId, run.firmId), eq(recordPairs.id, run.pairId)))
      .get()
    if (!pair) throw new Error('The record pair of this run no longer exists.')
    const read = [pair.record1Id, pair.record2Id].map((id) => {
      const found = readRecord(db, run.firmId, id)
      if (!found) throw new Error('A record of this run’s pair no longer exists.')
      return found
    })
    const components = read.map((r) => r.component)
    const { name: _name, sha256: _sha256, ...first } = components[0]!
    return {
      ...toSpectrumJson(
        first,
        computation,
        read.flatMap((r) => r.warnings.map((warning) => `${r.component.name}: ${warning}`)),
      ),
      pair: { id: run.pairId, name: pair.name, components },
    }
  }
  const found = run.recordId ? readRecord(db, run.firmId, run.recordId) : undefined
  if (!found) throw new Error('The record of this run no longer exists.')
  const { name: _name, sha256: _sha256, ...parameters } = found.component
  return toSpectrumJson(parameters, computation, found.warnings)
}
