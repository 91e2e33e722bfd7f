import { z } from 'zod'
import { COMBINATIONS } from '../vocabulary/combinations.js'
import { idSchema, listOf, namedIdSchema } from './common.js'
import {
  runCombinationSchema,
  runProgressEventSchema,
  runSchema,
  runSettingsInputShape,
  runSettingsSchema,
  runStatusEventSchema,
} from './runs.js'

/** A batch runs 1 to MAX_BATCH_SUBJECTS records and pairs, one run (and one credit) each. */
export const MAX_BATCH_SUBJECTS = 100

const distinctIds = (what: string) =>
  z
    .array(idSchema)
    .refine(
      (ids) => new Set(ids).size === ids.length,
      `Give each ${what} once; a batch runs each subject once.`,
    )

/**
 * POST /api/run-batches. The settings mean what they mean in POST /api/runs, with the same
 * defaults; `combinations` applies to the pairs (and is needed when there are pairs). A batch
 * starts first runs only: `revisionOf` is refused.
 */
export const createRunBatchBodySchema = z
  .strictObject({
    recordIds: distinctIds('record').default([]),
    pairIds: distinctIds('pair').default([]),
    ...runSettingsInputShape,
    combinations: z
      .array(runCombinationSchema)
      .min(1, 'Give at least one combination.')
      .refine((values) => new Set(values).size === values.length, 'Give each combination once.')
      .optional(),
    revisionOf: z
      .never({
        error:
          'A batch starts first runs only. Re-run a checked run from its own page (POST /api/runs with revisionOf).',
      })
      .optional(),
  })
  .superRefine((b, ctx) => {
    const subjects = b.recordIds.length + b.pairIds.length
    if (subjects < 1) {
      ctx.addIssue({
        code: 'custom',
        path: ['recordIds'],
        message: 'Give at least one record or pair to run.',
      })
    }
    if (subjects > MAX_BATCH_SUBJECTS) {
      ctx.addIssue({
        code: 'custom',
        path: ['recordIds'],
        message: `A batch runs at most ${MAX_BATCH_SUBJECTS} records and pairs in all; this one has ${subjects}.`,
      })
    }
    if (b.periodsS && b.periodGrid) {
      ctx.addIssue({
        code: 'custom',
        path: ['periodGrid'],
        message: 'Give either periodsS or periodGrid, not both.',
      })
    }
    if (b.pairIds.length > 0 && !b.combinations) {
      ctx.addIssue({
        code: 'custom',
        path: ['combinations'],
        message: `Give the combinations to compute for the pairs (${COMBINATIONS.join(', ')}).`,
      })
    }
    if (b.pairIds.length === 0 && b.combinations) {
      ctx.addIssue({
        code: 'custom',
        path: ['combinations'],
        message: 'Combinations apply to pairs, and this batch has none; leave combinations out.',
      })
    }
  })
export type CreateRunBatchBody = z.infer<typeof createRunBatchBodySchema>
export type CreateRunBatchInput = z.input<typeof createRunBatchBodySchema>

/** The answer of POST /api/run-batches (202): one run per subject, records first, in the order given. */
export const createdRunBatchSchema = z.object({ id: z.string(), runIds: z.array(z.string()) })
export type CreatedRunBatch = z.infer<typeof createdRunBatchSchema>

/** How many of a batch's runs are in each state. */
export const runBatchCountsSchema = z.object({
  queued: z.number().int(),
  running: z.number().int(),
  succeeded: z.number().int(),
  failed: z.number().int(),
})
export type RunBatchCounts = z.infer<typeof runBatchCountsSchema>

/** A batch in lists: its settings and counts, without the runs. */
export const runBatchSummarySchema = z.object({
  id: z.string(),
  /** The project of its subjects, or null when they span several projects. */
  projectId: z.string().nullable(),
  settings: runSettingsSchema,
  recordIds: z.array(z.string()),
  pairIds: z.array(z.string()),
  counts: runBatchCountsSchema,
  /** Every run has succeeded or failed. */
  finished: z.boolean(),
  createdBy: namedIdSchema,
  createdAt: z.number(),
})
export type RunBatchSummary = z.infer<typeof runBatchSummarySchema>

/** GET /api/run-batches/:id: the settings, the runs (in the batch's order) with their states, and counts by state. */
export const runBatchSchema = runBatchSummarySchema.extend({ runs: z.array(runSchema) })
export type RunBatch = z.infer<typeof runBatchSchema>

/** GET /api/run-batches */
export const runBatchListQuerySchema = z.strictObject({ projectId: idSchema.optional() })
export type RunBatchListQuery = z.infer<typeof runBatchListQuerySchema>
export const runBatchListSchema = listOf(runBatchSummarySchema)
export type RunBatchList = z.infer<typeof runBatchListSchema>

/**
 * The events of GET /api/run-batches/:id/events: those of /api/runs/:id/events (`event:` names
 * `progress` or `status`), each with the `runId` it is about. First one `status` per run; the
 * stream closes once every run has finished.
 */
export const runBatchProgressEventSchema = runProgressEventSchema.extend({ runId: z.string() })
export const runBatchStatusEventSchema = runStatusEventSchema.extend({ runId: z.string() })
export type RunBatchProgressEvent = z.infer<typeof runBatchProgressEventSchema>
export type RunBatchStatusEvent = z.infer<typeof runBatchStatusEventSchema>
