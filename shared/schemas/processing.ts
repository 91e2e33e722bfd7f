import { z } from 'zod'
import { nameInputSchema } from './common.js'
import { groundMotionShape } from './groundMotion.js'
import { MAX_FILTER_ORDER, MIN_FILTER_ORDER } from '../spectra/processing/butterworthSos.js'
import { MAX_BASELINE_ORDER } from '../spectra/processing/removeBaseline.js'

const orderSchema = (lo: number, hi: number, what: string) =>
  z
    .number({ error: `${what} must be a whole number from ${lo} to ${hi}.` })
    .int(`${what} must be a whole number from ${lo} to ${hi}.`)
    .min(lo, `${what} must be a whole number from ${lo} to ${hi}.`)
    .max(hi, `${what} must be a whole number from ${lo} to ${hi}.`)

const filterSchema = (label: string) =>
  z.strictObject({
    hz: z
      .number({ error: `Enter the ${label} corner in Hz, for example 0.1.` })
      .positive(`The ${label} corner must be above 0 Hz.`)
      .finite(`The ${label} corner must be a finite number of Hz.`),
    order: orderSchema(MIN_FILTER_ORDER, MAX_FILTER_ORDER, `The ${label} order`),
  })

/**
 * The body of POST /api/records/:id/processing/preview: each step optional, applied in the
 * order baseline, taper, pads, high-pass, low-pass. Checks that need the record (Nyquist, the
 * taper against the record's length, the 2,000,000-point limit) follow in the service.
 */
export const processingSettingsSchema = z.strictObject({
  baseline: z
    .strictObject({ order: orderSchema(0, MAX_BASELINE_ORDER, 'The baseline order') })
    .nullable()
    .optional(),
  taperS: z
    .number({ error: 'Enter the taper in seconds, for example 0.5.' })
    .min(0, 'The taper must be zero or more seconds.')
    .finite('The taper must be a finite number of seconds.')
    .nullable()
    .optional(),
  highPass: filterSchema('high-pass').nullable().optional(),
  lowPass: filterSchema('low-pass').nullable().optional(),
  phase: z.enum(['zero', 'causal'], { error: 'Choose zero or causal phase.' }).optional(),
  pads: z.enum(['keep', 'trim'], { error: 'Choose to keep or trim the pads.' }).optional(),
})
export type ProcessingSettingsBody = z.infer<typeof processingSettingsSchema>

/** POST /api/records/:id/processed: the settings and, optionally, the new record's name. */
export const createProcessedRecordSchema = processingSettingsSchema
  .extend({
    name: nameInputSchema('Enter a name.').optional(),
  })
  .refine((body) => Boolean(body.baseline || body.taperS || body.highPass || body.lowPass), {
    message: 'Choose at least one processing step: a baseline, a taper, a high-pass or a low-pass filter.',
    path: ['baseline'],
  })
export type CreateProcessedRecordBody = z.infer<typeof createProcessedRecordSchema>

const appliedFilterSchema = z.object({ hz: z.number(), order: z.number().int() })

/** One processing step as applied to the record with hash `sourceSha256`. */
export const processingStepSchema = z.object({
  baseline: z.object({ order: z.number().int() }).nullable(),
  taperS: z.number().nullable(),
  highPass: appliedFilterSchema.nullable(),
  lowPass: appliedFilterSchema.nullable(),
  phase: z.enum(['zero', 'causal']),
  /** null when no pads were added (no filter, or a causal one). */
  pads: z.enum(['keep', 'trim']).nullable(),
  /** Zero pad added at each end before filtering, s. */
  padS: z.number(),
  /** SHA-256 of the record the step was applied to (its stored samples, or the uploaded file). */
  sourceSha256: z.string(),
})
export type ProcessingStep = z.infer<typeof processingStepSchema>

/**
 * What a processed record carries: this step's settings as applied (with padS), its parent, and
 * the whole chain from the record as received, oldest step first (the last is this one).
 */
export const recordProcessingSchema = processingStepSchema.extend({
  parentSha256: z.string(),
  /** 1/(1.25·f_hp) of the highest high-pass corner in the chain, s; null without a high-pass. */
  usablePeriodMaxS: z.number().nullable(),
  chain: z.array(processingStepSchema),
})
export type RecordProcessing = z.infer<typeof recordProcessingSchema>

/** Acceleration, velocity and displacement in SI for plotting, as GET /api/records/:id/samples gives them. */
export const plotHistoriesSchema = z.object({
  timeS: z.array(z.number()),
  accelMPerS2: z.array(z.number()),
  velMPerS: z.array(z.number()),
  dispM: z.array(z.number()),
})
export type PlotHistories = z.infer<typeof plotHistoriesSchema>

/** GET /api/records/:id/fourier, and the spectra of a preview: Δt·|X| in m/s. */
export const fourierSpectrumSchema = z.object({
  frequencyHz: z.array(z.number()),
  rawMPerS: z.array(z.number()),
  smoothedMPerS: z.array(z.number()),
})
export type FourierSpectrumBody = z.infer<typeof fourierSpectrumSchema>

/** Record parameters and the drift figures an engineer checks before and after processing. */
export const processedParametersSchema = z.object({
  points: z.number().int(),
  dtS: z.number(),
  durationS: z.number(),
  ...groundMotionShape(),
  /** Integrated velocity and displacement at the last sample. */
  finalVelMPerS: z.number(),
  finalDispM: z.number(),
})
export type ProcessedParameters = z.infer<typeof processedParametersSchema>

const previewSideSchema = z.object({
  histories: plotHistoriesSchema,
  fourier: fourierSpectrumSchema,
  parameters: processedParametersSchema,
  warnings: z.array(z.string()),
})

/** The answer of POST /api/records/:id/processing/preview. Nothing is stored. */
export const processingPreviewSchema = z.object({
  before: previewSideSchema,
  /** Its histories start at t = −padS when the pads are kept. */
  after: previewSideSchema,
  gain: z.object({ frequencyHz: z.array(z.number()), gain: z.array(z.number()) }),
  applied: processingStepSchema.omit({ sourceSha256: true }),
  usablePeriodMaxS: z.number().nullable(),
})
export type ProcessingPreview = z.infer<typeof processingPreviewSchema>
