import { z } from 'zod'
import { combinationSchema } from '../vocabulary/combinations.js'
import type { SpectrumWarning } from '../spectra/warnings.js'
import { runMethodSchema } from './runs.js'

/**
 * Messages between the run queue (server/runs/runQueue.ts) and workers/spectrumWorker.ts.
 * Both sides parse what they receive. Samples and result series travel as transferred
 * buffers, never copied.
 */

const float64ArraySchema = z.custom<Float64Array>((v) => v instanceof Float64Array, 'expected a Float64Array')

/** One record's samples (m/s², uniform Δt), or the two components of a record pair. */
export const spectrumJobSchema = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('record'),
    dtS: z.number().positive(),
    samples: z.instanceof(ArrayBuffer, { message: 'expected the samples as an ArrayBuffer' }),
  }),
  z.object({
    kind: z.literal('pair'),
    dtS: z.number().positive(),
    samples1: z.instanceof(ArrayBuffer, { message: 'expected the first component as an ArrayBuffer' }),
    samples2: z.instanceof(ArrayBuffer, { message: 'expected the second component as an ArrayBuffer' }),
  }),
])
export type SpectrumJob = z.infer<typeof spectrumJobSchema>

/** The engine-facing part of a run's settings. */
export const workerSettingsSchema = z.object({
  method: runMethodSchema,
  dampingRatios: z.array(z.number().min(0).lt(0.5)).min(1),
  periodsS: z.array(z.number().positive()).min(1),
  /** Pair runs only: which combinations of the two components to compute. */
  combinations: z.array(combinationSchema).min(1).optional(),
})

export const workerRequestSchema = z.discriminatedUnion('type', [
  z.object({
    type: z.literal('run'),
    runId: z.string(),
    job: spectrumJobSchema,
    settings: workerSettingsSchema,
  }),
])
export type WorkerRequest = z.infer<typeof workerRequestSchema>

/** One damping ratio's peaks (and, for a pair, one combination's), in SI, in the order of the run's periods (the engine's SpectrumCurve). */
export const workerCurveSchema = z.object({
  dampingRatio: z.number(),
  combination: combinationSchema.optional(),
  sdM: float64ArraySchema,
  svMPerS: float64ArraySchema,
  saMPerS2: float64ArraySchema,
  psvMPerS: float64ArraySchema,
  psaMPerS2: float64ArraySchema,
  /** Records only: when the peaks occur. */
  sdTimeS: float64ArraySchema.optional(),
  saTimeS: float64ArraySchema.optional(),
})
export type WorkerCurve = z.infer<typeof workerCurveSchema>

/** The buffers of a curve's series (and its peak times, where it has them), to transfer, not copy. */
export function curveBuffers(curve: WorkerCurve): ArrayBuffer[] {
  const { sdM, svMPerS, saMPerS2, psvMPerS, psaMPerS2, sdTimeS, saTimeS } = curve
  return [sdM, svMPerS, saMPerS2, psvMPerS, psaMPerS2, sdTimeS, saTimeS].flatMap((series) =>
    series ? [series.buffer as ArrayBuffer] : [],
  )
}

/** The engine's MethodStatement: what produced the numbers. */
export const methodStatementSchema = z.object({
  method: runMethodSchema,
  solver: z.string(),
  newmarkGamma: z.number().nullable(),
  newmarkBeta: z.number().nullable(),
  recordDtS: z.number(),
  initialConditions: z.string(),
  subStepRule: z.string(),
  subStepsMin: z.number(),
  subStepsMax: z.number(),
  freeVibrationTail: z.string(),
  accuracyTarget: z.string(),
  kernel: z.enum(['wasm-simd', 'js']),
  engineVersion: z.string(),
  /** Pair runs: how the two components were combined (shared/spectra/rotd.ts). */
  combinationRule: z.string().optional(),
})

/** The engine's warnings as codes and values (shared/spectra/warnings.ts; worded by shared/warningMessages.ts). */
export const spectrumWarningSchema = z.discriminatedUnion('code', [
  z.object({ code: z.literal('periods-below-two-dt'), periods: z.number().int(), twoDtS: z.number() }),
  z.object({
    code: z.literal('damping-above-accuracy-limit'),
    accuracyTarget: z.number(),
    dampingLimit: z.number(),
  }),
  z.object({
    code: z.literal('sub-step-cap'),
    oscillators: z.number().int(),
    maxSubSteps: z.number().int(),
    errorEstimate: z.number(),
  }),
  z.object({
    code: z.literal('peak-bound-above-budget'),
    oscillators: z.number().int(),
    maxSubSteps: z.number().int(),
    budget: z.number(),
  }),
]) satisfies z.ZodType<SpectrumWarning>

/** The engine's SpectrumComputation for a record or a pair, as the worker posts it (series as transferred buffers). */
export const workerComputationSchema = z.object({
  periodsS: float64ArraySchema,
  curves: z.array(workerCurveSchema).min(1),
  methodStatement: methodStatementSchema,
  warnings: z.array(spectrumWarningSchema),
  oscillatorSteps: z.number(),
})

export const workerReplySchema = z.discriminatedUnion('type', [
  z.object({ type: z.literal('progress'), runId: z.string(), progress: z.number().min(0).max(1) }),
  z.object({
    type: z.literal('result'),
    runId: z.string(),
    computation: workerComputationSchema,
    /** Wall time of the computation inside the worker. */
    computeMs: z.number().nonnegative(),
  }),
  z.object({ type: z.literal('error'), runId: z.string(), message: z.string() }),
])
export type WorkerReply = z.infer<typeof workerReplySchema>
