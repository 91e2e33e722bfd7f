import { z } from 'zod'
import { combinationSchema } from '../vocabulary/combinations.js'
import { idSchema, listOf, namedIdSchema, nameInputSchema } from './common.js'
import { reviewStateSchema } from './reviews.js'
import { targetDefinitionSchema, targetInputSchema } from './targets.js'

/** At most this many runs in one comparison. */
export const MAX_COMPARISON_RUNS = 60

export { combinationSchema, type Combination } from '../vocabulary/combinations.js'

export const meanKindSchema = z.enum(['arithmetic', 'geometric'], {
  error: 'Choose arithmetic or geometric.',
})
export type MeanKind = z.infer<typeof meanKindSchema>

export const scalingRuleSchema = z.enum(['lsq-log', 'suite-90'], { error: 'Choose lsq-log or suite-90.' })

/** The scaling period range [fromS, toS] and the rule. */
export const scalingSchema = z
  .strictObject({
    fromS: z
      .number({ error: 'fromS must be a number of seconds.' })
      .positive('fromS must be positive.')
      .max(100),
    toS: z.number({ error: 'toS must be a number of seconds.' }).positive('toS must be positive.').max(100),
    rule: scalingRuleSchema.default('lsq-log'),
  })
  .refine((s) => s.toS > s.fromS, { message: 'toS must be greater than fromS.', path: ['toS'] })
export type ScalingInput = z.input<typeof scalingSchema>

/** A target for a comparison: a saved target by id, or a definition given inline. */
export const comparisonTargetInputSchema = z.union([
  z.strictObject({ targetId: idSchema }),
  targetInputSchema,
])
export type ComparisonTargetInput = z.input<typeof comparisonTargetInputSchema>

const nameSchema = nameInputSchema('Give the comparison a name.')
const runIdsSchema = z
  .array(idSchema)
  .min(1, 'Choose at least one run.')
  .max(MAX_COMPARISON_RUNS, `Choose at most ${MAX_COMPARISON_RUNS} runs.`)
  .refine((ids) => new Set(ids).size === ids.length, 'Choose each run once.')
const dampingSchema = z
  .number({ error: 'dampingRatio must be a number.' })
  .min(0, 'dampingRatio must be at least 0.')
  .lt(0.5, 'dampingRatio must be below 0.5 (a ratio, not a percentage: 5% is 0.05).')

/** POST /api/comparisons */
export const createComparisonBodySchema = z.strictObject({
  name: nameSchema,
  projectId: idSchema.optional(),
  runIds: runIdsSchema,
  dampingRatio: dampingSchema,
  target: comparisonTargetInputSchema.optional(),
  scaling: scalingSchema.optional(),
  meanKind: meanKindSchema.default('arithmetic'),
  /** Which combination of a pair run's two components to compare (pair runs only). */
  combination: combinationSchema.optional(),
  /** The checked comparison this one revises. */
  revisionOf: idSchema.optional(),
})
export type CreateComparisonBody = z.input<typeof createComparisonBodySchema>

/** POST /api/comparisons/preview: the same inputs as a new comparison, drawn without saving it. */
export const previewComparisonBodySchema = createComparisonBodySchema
  .omit({ revisionOf: true, projectId: true })
  .extend({ name: nameSchema.optional() })
export type PreviewComparisonBody = z.input<typeof previewComparisonBodySchema>

/** PATCH /api/comparisons/:id: any field; null removes the target, the scaling or the combination. */
export const updateComparisonBodySchema = z
  .strictObject({
    name: nameSchema.optional(),
    runIds: runIdsSchema.optional(),
    dampingRatio: dampingSchema.optional(),
    target: comparisonTargetInputSchema.nullable().optional(),
    scaling: scalingSchema.nullable().optional(),
    meanKind: meanKindSchema.optional(),
    combination: combinationSchema.nullable().optional(),
  })
  .refine((b) => Object.keys(b).length > 0, 'Give at least one field to change.')
export type UpdateComparisonBody = z.input<typeof updateComparisonBodySchema>

/** A comparison's target as stored: the definition it was evaluated from, and where it came from. */
export const storedTargetSchema = z.object({
  definition: targetDefinitionSchema,
  targetId: z.string().optional(),
  name: z.string().optional(),
})
export type StoredTarget = z.infer<typeof storedTargetSchema>

export const storedScalingSchema = z.object({
  fromS: z.number(),
  toS: z.number(),
  rule: scalingRuleSchema,
})

/** A comparison as lists answer it. */
export const comparisonSummarySchema = z.object({
  id: z.string(),
  projectId: z.string(),
  name: z.string(),
  runIds: z.array(z.string()),
  dampingRatio: z.number(),
  meanKind: meanKindSchema,
  combination: combinationSchema.nullable(),
  target: storedTargetSchema.nullable(),
  scaling: storedScalingSchema.nullable(),
  revision: z.number().int(),
  revisionOf: z.string().nullable(),
  reviewState: reviewStateSchema,
  createdBy: namedIdSchema,
  createdAt: z.number(),
  updatedAt: z.number().nullable(),
})
export type ComparisonSummary = z.infer<typeof comparisonSummarySchema>

/** GET /api/comparisons */
export const comparisonListQuerySchema = z.strictObject({ projectId: idSchema.optional() })
export const comparisonListSchema = listOf(comparisonSummarySchema)
export type ComparisonList = z.infer<typeof comparisonListSchema>

/** Ordinates in g; null where a curve or the target is not defined. */
const ordinatesG = z.array(z.number().nullable())

export const suiteStatisticsViewSchema = z.object({
  kind: meanKindSchema,
  label: z.string(),
  meanG: ordinatesG,
  /** Mean − 1σ and mean + 1σ (of ln PSA for the geometric mean); null with fewer than two curves. */
  lowerG: ordinatesG.nullable(),
  upperG: ordinatesG.nullable(),
})
export type SuiteStatisticsView = z.infer<typeof suiteStatisticsViewSchema>

/**
 * GET /api/comparisons/:id: everything the chart and the scale-factor table need, on one period
 * grid. PSA is in g. The exports draw from the same object.
 */
export const comparisonViewSchema = z.object({
  comparison: comparisonSummarySchema,
  periodsS: z.array(z.number()),
  curves: z.array(
    z.object({
      runId: z.string(),
      label: z.string(),
      /** The pair combination drawn; absent for single-record runs. */
      combination: combinationSchema.optional(),
      revision: z.number().int(),
      psaG: ordinatesG,
      /** The amplitude factor from the scaling rule, when the comparison has one. */
      scaleFactor: z.number().nullable(),
    }),
  ),
  /** The suite as recorded, and as scaled (null without scaling). */
  suite: z.object({ unscaled: suiteStatisticsViewSchema, scaled: suiteStatisticsViewSchema.nullable() }),
  target: z
    .object({
      label: z.string(),
      notes: z.array(z.string()),
      saG: ordinatesG,
      /** 90% of the target, drawn over the scaling range (or the whole grid without one). */
      target90G: ordinatesG,
      beyondDefinedRange: z.boolean(),
    })
    .nullable(),
  scaling: z
    .object({
      rule: scalingRuleSchema,
      ruleLabel: z.string(),
      fromS: z.number(),
      toS: z.number(),
      check: z.object({
        passed: z.boolean(),
        minRatio: z.number(),
        governingPeriodS: z.number(),
        label: z.string(),
      }),
    })
    .nullable(),
  /** What produced the data: damping, combination, mean, grid; for the chart and exports. */
  labels: z.object({
    title: z.string(),
    damping: z.string(),
    mean: z.string(),
    combination: z.string().nullable(),
    grid: z.string(),
  }),
  /** The suite's make-up: a record counted twice, fewer subjects than the target code usually asks for. */
  suiteCautions: z.array(z.string()),
  caution: z.string(),
})
export type ComparisonView = z.infer<typeof comparisonViewSchema>

/** The answer of POST /api/comparisons/preview: a view without a saved comparison. */
export const comparisonDrawingSchema = comparisonViewSchema.omit({ comparison: true })
export type ComparisonDrawing = z.infer<typeof comparisonDrawingSchema>
