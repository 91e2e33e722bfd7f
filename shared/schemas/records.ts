import { z } from 'zod'
import { readDecimal } from '../forms/runSettingsText.js'
import { MAX_RECORD_POINTS } from '../spectra/parseRecord.js'
import { SOURCE_UNITS } from '../spectra/units.js'
import { idSchema, listOf, nameInputSchema } from './common.js'
import { groundMotionShape } from './groundMotion.js'
import { plotHistoriesSchema, recordProcessingSchema } from './processing.js'

/** The upload limits of POST /api/records. */
export const MAX_UPLOAD_BYTES = 50 * 1024 * 1024
export { MAX_RECORD_POINTS }

export const sourceUnitsSchema = z.enum(SOURCE_UNITS, {
  error: `Choose one of ${SOURCE_UNITS.join(', ')}.`,
})

/** Multipart text fields arrive as strings; an empty field means "not given". */
const optionalField = <T extends z.ZodType>(schema: T) =>
  z.preprocess((v) => (typeof v === 'string' && v.trim() === '' ? undefined : v), schema.optional())

/** The text fields of POST /api/records (the file itself is the `file` part). */
export const uploadRecordFieldsSchema = z.strictObject({
  name: optionalField(z.string().trim().max(200, 'Use at most 200 characters.')),
  units: optionalField(sourceUnitsSchema),
  // "0,005" (a decimal comma) reads as 0.005; anything else unreadable is refused on the field.
  dtS: optionalField(
    z.preprocess(
      (v) => (typeof v === 'string' ? (readDecimal(v) ?? v) : v),
      z.coerce
        .number({ error: 'Enter the time step in seconds, for example 0.005.' })
        .positive('The time step must be greater than zero.')
        .max(10, 'The time step must be at most 10 s.'),
    ),
  ),
  component: optionalField(z.string().trim().max(40, 'Use at most 40 characters.')),
  projectId: optionalField(idSchema),
})
export type UploadRecordFields = z.infer<typeof uploadRecordFieldsSchema>

/** The answer of POST /api/records (201), exactly as the records issue gives it. */
export const recordSchema = z.object({
  id: z.string(),
  name: z.string(),
  projectId: z.string(),
  points: z.number().int(),
  dtS: z.number(),
  durationS: z.number(),
  sourceUnits: sourceUnitsSchema,
  component: z.string().nullable(),
  ...groundMotionShape(),
  sha256: z.string(),
  uploadedBy: z.string(),
  createdAt: z.number(),
  warnings: z.array(z.string()),
})
export type RecordInfo = z.infer<typeof recordSchema>

/** A record as GET /api/records and GET /api/records/:id answer it: the upload answer plus names for display. */
export const recordDetailSchema = recordSchema.extend({
  projectName: z.string(),
  uploaderName: z.string(),
  sourceFileName: z.string(),
  format: z.string(),
  synthetic: z.boolean(),
  /** The record this one was processed from; null for a record as received. */
  parentId: z.string().nullable(),
  /** For a processed record, the processing as applied and its chain; null otherwise. */
  processing: recordProcessingSchema.nullable(),
  /** Records processed from this one, oldest first. */
  children: z.array(z.object({ id: z.string(), name: z.string(), createdAt: z.number() })),
})
export type RecordDetail = z.infer<typeof recordDetailSchema>

/** PATCH /api/records/:id: rename a record (its samples and file never change). */
export const updateRecordBodySchema = z.strictObject({
  name: nameInputSchema('The name cannot be blank.'),
})
export type UpdateRecordBody = z.infer<typeof updateRecordBodySchema>

export const recordListQuerySchema = z.strictObject({ projectId: idSchema.optional() })

/** GET /api/records */
export const recordListSchema = listOf(recordDetailSchema)
export type RecordList = z.infer<typeof recordListSchema>

export const DEFAULT_PLOT_POINTS = 4000

export const recordSamplesQuerySchema = z.strictObject({
  maxPoints: z.coerce
    .number({ error: 'maxPoints must be a whole number.' })
    .int('maxPoints must be a whole number.')
    .min(100, 'maxPoints must be at least 100.')
    .max(MAX_RECORD_POINTS, `maxPoints must be at most ${MAX_RECORD_POINTS}.`)
    .default(DEFAULT_PLOT_POINTS),
})

/**
 * GET /api/records/:id/samples: the record in SI, thinned for plotting. When thinned, each
 * bucket of samples gives its lowest and highest value (in time order) at two evenly spaced
 * times, so peaks survive and the time axis stays uniform. With maxPoints ≥ points every sample
 * comes unthinned. A processed record's kept pads start at t = −padS.
 */
export const recordSamplesSchema = plotHistoriesSchema
export type RecordSamples = z.infer<typeof recordSamplesSchema>
