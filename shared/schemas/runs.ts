import { z } from 'zod'
import { type Combination, combinationSchema } from '../vocabulary/combinations.js'
import { runStatusSchema } from '../vocabulary/runStatuses.js'
import { idSchema, listOf, namedIdSchema } from './common.js'
import { reviewStateSchema } from './reviews.js'

/** Limits of a run's settings (runs issue): what one credit buys. */
export const MAX_DAMPING_RATIOS = 10
export const MAX_PERIODS = 2000
export const MAX_PERIOD_S = 20

/** The oscillator solvers a run may use (the engine's method names). */
export const runMethodSchema = z.enum(['newmark-average', 'newmark-linear', 'piecewise-exact'], {
  error: 'Choose newmark-average, newmark-linear or piecewise-exact.',
})
export type RunMethod = z.infer<typeof runMethodSchema>

const dampingRatioSchema = z
  .number({ error: 'Each damping ratio must be a number.' })
  .min(0, 'Damping ratios must be at least 0.')
  .lt(0.5, 'Damping ratios must be below 0.5 (a ratio, not a percentage: 5% is 0.05).')

const periodSchema = z
  .number({ error: 'Each period must be a number of seconds.' })
  .positive('Periods must be positive.')
  .max(MAX_PERIOD_S, `Periods must be at most ${MAX_PERIOD_S} s.`)

const noRepeats = (values: number[]) => new Set(values).size === values.length

export const dampingRatiosSchema = z
  .array(dampingRatioSchema)
  .min(1, 'Give at least one damping ratio.')
  .max(MAX_DAMPING_RATIOS, `Give at most ${MAX_DAMPING_RATIOS} damping ratios.`)
  .refine(noRepeats, 'Give each damping ratio once.')

/** A list of periods, used exactly as given (order kept). */
export const periodsSSchema = z
  .array(periodSchema)
  .min(1, 'Give at least one period.')
  .max(MAX_PERIODS, `Give at most ${MAX_PERIODS} periods.`)
  .refine(noRepeats, 'Give each period once.')

/** Log-spaced periods from minS to maxS inclusive. */
export const periodGridSchema = z
  .strictObject({
    minS: periodSchema,
    maxS: periodSchema,
    count: z
      .number()
      .int('count must be a whole number.')
      .min(2, 'A period grid needs at least 2 points.')
      .max(MAX_PERIODS, `A period grid has at most ${MAX_PERIODS} points.`),
  })
  .refine((g) => g.maxS > g.minS, { message: 'maxS must be greater than minS.', path: ['maxS'] })
export type PeriodGrid = z.infer<typeof periodGridSchema>

/**
 * The settings part of POST /api/runs, kept apart from the subject (recordId) so that a
 * two-component run can add `pairId` and `combinations` beside the same settings.
 */
export const runSettingsInputShape = {
  dampingRatios: dampingRatiosSchema.default([0.05]),
  periodsS: periodsSSchema.optional(),
  periodGrid: periodGridSchema.optional(),
  method: runMethodSchema.default('newmark-average'),
}

/** A re-run of an earlier run of the same record or pair (a new revision, e.g. after it was checked). */
const revisionOfShape = { revisionOf: idSchema.optional() }

const onePeriodChoice = {
  check: (b: { periodsS?: number[]; periodGrid?: PeriodGrid }) => !(b.periodsS && b.periodGrid),
  issue: { message: 'Give either periodsS or periodGrid, not both.', path: ['periodGrid'] },
}

/** POST /api/runs of one record, as a form fills it. */
export const createRunBodySchema = z
  .strictObject({ recordId: idSchema, ...runSettingsInputShape, ...revisionOfShape })
  .refine(onePeriodChoice.check, onePeriodChoice.issue)
export type CreateRunBody = z.infer<typeof createRunBodySchema>

/** How a pair run combines its two horizontal components (Boore 2010 for RotD50/RotD100). */
export const runCombinationSchema = combinationSchema
export type RunCombination = Combination

const combinationsSchema = z
  .array(runCombinationSchema)
  .min(1, 'Give at least one combination.')
  .refine((values) => new Set(values).size === values.length, 'Give each combination once.')

/** POST /api/runs of a record pair, as a form fills it: the same settings, with the combinations to compute. */
export const createPairRunBodySchema = z
  .strictObject({
    pairId: idSchema,
    combinations: combinationsSchema,
    ...runSettingsInputShape,
    ...revisionOfShape,
  })
  .refine(onePeriodChoice.check, onePeriodChoice.issue)
export type CreatePairRunBody = z.infer<typeof createPairRunBodySchema>

/** What a run computes: one record, or a record pair and the combinations of its two components. */
export const runSubjectSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('record'), recordId: idSchema }),
  z.object({ kind: z.literal('pair'), pairId: idSchema, combinations: combinationsSchema }),
])
export type RunSubject = z.infer<typeof runSubjectSchema>

/**
 * The one body of POST /api/runs, as the server reads it. On the wire the subject is `recordId`,
 * or `pairId` with `combinations`, beside the same settings; parsed, it is one discriminated
 * `subject`, so nothing after this edge asks which fields a body has.
 */
export const runRequestSchema = z
  .strictObject({
    recordId: idSchema.optional(),
    pairId: idSchema.optional(),
    combinations: combinationsSchema.optional(),
    ...runSettingsInputShape,
    ...revisionOfShape,
  })
  .refine(onePeriodChoice.check, onePeriodChoice.issue)
  .superRefine((b, context) => {
    if (b.recordId && b.pairId)
      context.addIssue({
        code: 'custom',
        path: ['pairId'],
        message: 'Give a recordId or a pairId, not both.',
      })
    else if (!b.recordId && !b.pairId)
      context.addIssue({
        code: 'custom',
        path: ['recordId'],
        message: 'Give the recordId of the record to run (or a pairId for a record pair).',
      })
    else if (b.pairId && !b.combinations)
      context.addIssue({
        code: 'custom',
        path: ['combinations'],
        message: 'Give the combinations to compute.',
      })
    else if (b.recordId && b.combinations)
      context.addIssue({
        code: 'custom',
        path: ['combinations'],
        message: 'Combinations apply to a record pair only.',
      })
  })
  .transform(({ recordId, pairId, combinations, ...settings }): RunRequest => ({
    ...settings,
    subject: pairId
      ? { kind: 'pair', pairId, combinations: combinations ?? [] }
      : { kind: 'record', recordId: recordId ?? '' },
  }))
/** A run request: its subject, the settings as given (resolved by the server) and the run it revises. */
export type RunRequest = Omit<CreateRunBody, 'recordId'> & { subject: RunSubject }

/** Where a run's periods came from. */
export const periodChoiceSchema = z.enum(['default', 'list', 'grid'])
export type PeriodChoice = z.infer<typeof periodChoiceSchema>

/** The settings a run was computed with, stored with the run and its spectrum. */
export const runSettingsSchema = z.object({
  method: runMethodSchema,
  dampingRatios: z.array(z.number()),
  /** Every period the oscillators were solved at, in the order used. */
  periodsS: z.array(z.number()),
  periodChoice: periodChoiceSchema,
  periodGrid: z.object({ minS: z.number(), maxS: z.number(), count: z.number().int() }).nullable(),
  /** Pair runs: the combinations computed, one curve each per damping ratio. */
  combinations: z.array(runCombinationSchema).optional(),
})
export type RunSettings = z.infer<typeof runSettingsSchema>

export { runStatusSchema, type RunStatus, isFinished } from '../vocabulary/runStatuses.js'

/** A run as the API answers it. */
export const runSchema = z.object({
  id: z.string(),
  projectId: z.string(),
  recordId: z.string().nullable(),
  /** Two-component runs (a record pair) carry a pairId instead of a recordId. */
  pairId: z.string().nullable(),
  /** The record's (or pair's) name, for lists. */
  subjectName: z.string(),
  status: runStatusSchema,
  /** 0 to 1. */
  progress: z.number(),
  error: z.string().nullable(),
  settings: runSettingsSchema,
  creditsCharged: z.number().int(),
  recordSha256: z.string(),
  engineVersion: z.string().nullable(),
  /** Milliseconds: time queued, time computing in the worker, total. */
  timings: z.record(z.string(), z.number()).nullable(),
  createdBy: namedIdSchema,
  createdAt: z.number(),
  startedAt: z.number().nullable(),
  finishedAt: z.number().nullable(),
  /** 1 for a first run; a re-run of `revisionOf` counts up. */
  revision: z.number().int(),
  revisionOf: z.string().nullable(),
  /** Where the run stands in checking (draft until submitted). */
  reviewState: reviewStateSchema,
})
export type Run = z.infer<typeof runSchema>

/** GET /api/runs */
export const runListQuerySchema = z.strictObject({
  projectId: idSchema.optional(),
  recordId: idSchema.optional(),
})
export type RunListQuery = z.infer<typeof runListQuerySchema>

export const runListSchema = listOf(runSchema)
export type RunList = z.infer<typeof runListSchema>

/** The events of GET /api/runs/:id/events (server-sent events, `event:` names these types). */
export const runProgressEventSchema = z.object({ progress: z.number() })
export const runStatusEventSchema = z.object({
  status: runStatusSchema,
  progress: z.number(),
  error: z.string().nullable(),
})
export type RunProgressEvent = z.infer<typeof runProgressEventSchema>
export type RunStatusEvent = z.infer<typeof runStatusEventSchema>
