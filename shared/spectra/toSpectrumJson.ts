/**
 * The JSON form of a spectrum (shared/schemas/spectrum.ts): plain arrays, SI units. The same for a
 * record and a pair (whose curves carry their combination and no peak times).
 */
import type { SpectrumResult } from '../schemas/spectrum.js'
import { warningMessages } from '../warningMessages.js'
import type { SpectrumComputation } from './computeSpectrum.js'
import type { RecordParameters } from './recordParameters.js'
import type { SourceUnits } from './units.js'

export interface SpectrumJsonRecord extends RecordParameters {
  sourceUnits: SourceUnits
}

/**
 * `record` is the record's parameters (a pair's first component); `recordWarnings` are the
 * record's own cautions, already worded, shown before the computation's.
 */
export function toSpectrumJson(
  record: SpectrumJsonRecord,
  computation: SpectrumComputation,
  recordWarnings: readonly string[] = [],
): SpectrumResult {
  return {
    record: {
      points: record.points,
      dtS: record.dtS,
      durationS: record.durationS,
      sourceUnits: record.sourceUnits,
      pgaMPerS2: record.pgaMPerS2,
      pgvMPerS: record.pgvMPerS,
      pgdM: record.pgdM,
      ariasMPerS: record.ariasMPerS,
      d595S: record.d595S,
      cavMPerS: record.cavMPerS,
    },
    method: computation.methodStatement.method,
    methodStatement: { ...computation.methodStatement },
    warnings: [...recordWarnings, ...warningMessages(computation.warnings)],
    warningCodes: computation.warnings.map((warning) => ({ ...warning })),
    periodsS: Array.from(computation.periodsS),
    curves: computation.curves.map((curve) => ({
      dampingRatio: curve.dampingRatio,
      ...(curve.combination ? { combination: curve.combination } : {}),
      sdM: Array.from(curve.sdM),
      svMPerS: Array.from(curve.svMPerS),
      saMPerS2: Array.from(curve.saMPerS2),
      psvMPerS: Array.from(curve.psvMPerS),
      psaMPerS2: Array.from(curve.psaMPerS2),
      ...(curve.sdTimeS ? { sdTimeS: Array.from(curve.sdTimeS) } : {}),
      ...(curve.saTimeS ? { saTimeS: Array.from(curve.saTimeS) } : {}),
    })),
  }
}
