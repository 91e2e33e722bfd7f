import {
  type MethodStatement,
  type RecordSpectrumCurve,
  computeSpectrum,
} from '../../shared/spectra/computeSpectrum.js'
import { DEMO_RECORD_IDS, demoRecord } from '../../shared/spectra/demo/demoRecords.js'
import { parseRecord } from '../../shared/spectra/parseRecord.js'
import { defaultPeriodsS } from '../../shared/spectra/periods.js'
import {
  type RecordParameters,
  integrateRecord,
  recordParameters,
  recordWarnings,
} from '../../shared/spectra/recordParameters.js'
import { curveBuffers } from '../../shared/schemas/spectrumWorker.js'
import { warningMessages } from '../../shared/warningMessages.js'

export interface DemoSpectrumResult {
  record: { id: string; name: string; description: string; fileName: string; sourceUnits: string }
  parameters: RecordParameters
  /** Cautions about the record itself (baseline, first sample). */
  recordWarnings: string[]
  accelMPerS2: Float64Array
  velMPerS: Float64Array
  dispM: Float64Array
  periodsS: Float64Array
  curve: RecordSpectrumCurve
  methodStatement: MethodStatement
  /** Cautions about this computation (periods below 2Δt, sub-step caps), worded by the message table. */
  computationWarnings: string[]
  computeMs: number
}

/**
 * The Overview's job: the first bundled synthetic demo record, read by the same
 * parser as an upload, on the default period grid (100 per decade, 0.01–10 s)
 * with the default method.
 */
export function computeDemoSpectrum(dampingRatio: number): DemoSpectrumResult {
  const demo = demoRecord(DEMO_RECORD_IDS[0] ?? 'synthetic-far-field')
  const parsed = parseRecord(demo.text)
  const { accelMPerS2, dtS } = parsed
  const started = performance.now()
  const spectrum = computeSpectrum(
    { accelMPerS2, dtS },
    { dampingRatios: [dampingRatio], periodsS: defaultPeriodsS(), method: 'newmark-average' },
  )
  const computeMs = performance.now() - started
  const curve = spectrum.curves[0]
  if (!curve) throw new Error('the engine returned no curve')
  const { velMPerS, dispM } = integrateRecord(accelMPerS2, dtS)
  return {
    record: {
      id: demo.id,
      name: demo.name,
      description: demo.description,
      fileName: demo.fileName,
      sourceUnits: parsed.sourceUnits,
    },
    parameters: recordParameters(accelMPerS2, dtS),
    recordWarnings: [...parsed.warnings, ...recordWarnings(accelMPerS2, dtS)],
    accelMPerS2,
    velMPerS,
    dispM,
    periodsS: spectrum.periodsS,
    curve,
    methodStatement: spectrum.methodStatement,
    computationWarnings: warningMessages(spectrum.warnings),
    computeMs,
  }
}

/** The buffers to transfer (not copy) back from the worker. */
export function transferablesOf(result: DemoSpectrumResult): ArrayBuffer[] {
  const series = [result.accelMPerS2, result.velMPerS, result.dispM, result.periodsS]
  return [...series.map((a) => a.buffer as ArrayBuffer), ...curveBuffers(result.curve)]
}
