import { and, eq } from 'drizzle-orm'
import type { SpectrumRecordSummary, SpectrumResult } from '../../shared/schemas/spectrum.js'
import type { WorkerReply } from '../../shared/schemas/spectrumWorker.js'
import { isSourceUnits } from '../../shared/spectra/units.js'
import type { Db } from '../db/client.js'
import { recordPairs, records } from '../db/schema.js'
import type { ClaimedRun } from './runStore.js'
import { recordSummaryColumns } from './recordSummaryColumns.js'

type PairComputation = Extract<WorkerReply, { type: 'pair-result' }>['computation']

/** A pair run's spectrum JSON also names the pair and both components. */
export type PairSpectrumResult = SpectrumResult & {
  pair: { id: string; name: string; components: (SpectrumRecordSummary & { name: string; sha256: string })[] }
}

/**
 * The spectrum row of a finished pair run: the shape of shared/schemas/spectrum.ts with each
 * curve tagged by its combination. `record` holds the first component's parameters (the schema
 * has one record); `pair.components` holds both.
 */
export function storedPairSpectrum(
  db: Db,
  run: ClaimedRun,
  computation: PairComputation,
): PairSpectrumResult {
  if (!run.pairId) throw new Error('This run has no record pair.')
  const pair = db
    .select({ name: recordPairs.name, record1Id: recordPairs.record1Id, record2Id: recordPairs.record2Id })
    .from(recordPairs)
    .where(and(eq(recordPairs.firmId, run.firmId), eq(recordPairs.id, run.pairId)))
    .get()
  if (!pair) throw new Error('The record pair of this run no longer exists.')
  const components = [pair.record1Id, pair.record2Id].map((id) => {
    const row = db
      .select({ name: records.name, sha256: records.sha256, ...recordSummaryColumns })
      .from(records)
      .where(and(eq(records.firmId, run.firmId), eq(records.id, id)))
      .get()
    if (!row) throw new Error('A record of this run’s pair no longer exists.')
    const { sourceUnits, ...rest } = row
    if (!isSourceUnits(sourceUnits)) throw new Error(`The record's units "${sourceUnits}" are not known.`)
    return { ...rest, sourceUnits }
  })
  const [first] = components
  if (!first) throw new Error('The record pair of this run is incomplete.')
  const summary = ({
    name: _name,
    sha256: _sha,
    warnings: _warnings,
    ...parameters
  }: (typeof components)[number]) => parameters
  return {
    record: summary(first),
    method: computation.methodStatement.method,
    methodStatement: { ...computation.methodStatement },
    warnings: [
      ...components.flatMap((c) => c.warnings.map((w) => `${c.name}: ${w}`)),
      ...computation.warnings,
    ],
    periodsS: Array.from(computation.periodsS),
    curves: computation.curves.map((curve) => ({
      dampingRatio: curve.dampingRatio,
      combination: curve.combination,
      sdM: Array.from(curve.sdM),
      svMPerS: Array.from(curve.svMPerS),
      saMPerS2: Array.from(curve.saMPerS2),
      psvMPerS: Array.from(curve.psvMPerS),
      psaMPerS2: Array.from(curve.psaMPerS2),
    })),
    pair: {
      id: run.pairId,
      name: pair.name,
      components: components.map(({ warnings: _warnings, ...c }) => c),
    },
  }
}
