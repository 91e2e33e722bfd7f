import { z } from 'zod'
import { idSchema, listOf, namedIdSchema, nameInputSchema } from './common.js'

/** At most this many periods in a preview or a user target. */
export const MAX_TARGET_POINTS = 5000
/** Largest CSV text accepted for a user target (characters). */
export const MAX_TARGET_CSV_CHARS = 500_000

const gSchema = (name: string) =>
  z
    .number({ error: `${name} must be a number in g.` })
    .positive(`${name} must be positive.`)
    .max(10, `${name} must be at most 10 g.`)

const positivePeriod = z
  .number({ error: 'Each period must be a number of seconds.' })
  .positive('Periods must be positive.')
  .max(100, 'Periods must be at most 100 s.')

const asce7Shape = {
  kind: z.literal('asce7-two-period'),
  sdsG: gSchema('sdsG'),
  sd1G: gSchema('sd1G'),
  tlS: z.number({ error: 'tlS must be a number of seconds.' }).positive('tlS must be positive.').max(100),
  level: z.enum(['design', 'mceR']).default('design'),
}
type Check<T> = [(value: T) => boolean, { message: string; path: string[] }]
const asce7Refinement: Check<{ tlS: number; sd1G: number; sdsG: number }> = [
  (t) => t.tlS >= t.sd1G / t.sdsG,
  { message: 'tlS must be at least TS = SD1/SDS.', path: ['tlS'] },
]

const en1998Shape = {
  kind: z.literal('en1998-1'),
  spectrumType: z.union([z.literal(1), z.literal(2)], { error: 'spectrumType must be 1 or 2.' }),
  groundType: z.enum(['A', 'B', 'C', 'D', 'E'], { error: 'groundType must be one of A, B, C, D, E.' }),
  agG: gSchema('agG'),
  dampingRatio: z
    .number({ error: 'dampingRatio must be a number.' })
    .min(0, 'dampingRatio must be at least 0.')
    .lt(0.5, 'dampingRatio must be below 0.5 (a ratio, not a percentage: 5% is 0.05).')
    .default(0.05),
}

const userShape = {
  kind: z.literal('user'),
  periodsS: z.array(positivePeriod).min(2, 'A user target needs at least two points.').max(MAX_TARGET_POINTS),
  saG: z.array(gSchema('Each Sa')).max(MAX_TARGET_POINTS),
  source: z.string().trim().max(200).optional(),
}
type UserPoints = { periodsS: number[]; saG: number[] }
const sameLength: Check<UserPoints> = [
  (t) => t.periodsS.length === t.saG.length,
  { message: 'periodsS and saG must have the same length.', path: ['saG'] },
]
const increasing: Check<UserPoints> = [
  (t) => t.periodsS.every((p, i) => i === 0 || p > (t.periodsS[i - 1] as number)),
  { message: 'periodsS must be strictly increasing.', path: ['periodsS'] },
]

const userCsvShape = {
  kind: z.literal('user-csv'),
  csv: z.string().min(1, 'The CSV is empty.').max(MAX_TARGET_CSV_CHARS, 'The CSV is too long.'),
  source: z.string().trim().max(200).optional(),
}

/** ASCE 7-16 §11.4.6 two-period spectrum, from SDS, SD1 and TL; MCE_R = 1.5 × design. */
export const asce7TargetSchema = z.strictObject(asce7Shape).refine(...asce7Refinement)

/** EN 1998-1 §3.2.2.2 elastic spectrum; the damping is a ratio (0.05 for 5%). */
export const en1998TargetSchema = z.strictObject(en1998Shape)

/** A target given as points (period s, Sa g), interpolated log-log between them. */
export const userTargetSchema = z
  .strictObject(userShape)
  .refine(...sameLength)
  .refine(...increasing)

/** A user target as CSV text (period s, Sa g per row); the server parses it. */
export const userCsvTargetSchema = z.strictObject(userCsvShape)

/** A saved target's inputs. */
export const targetDefinitionSchema = z.discriminatedUnion('kind', [
  asce7TargetSchema,
  en1998TargetSchema,
  userTargetSchema,
])
export type TargetDefinitionInput = z.input<typeof targetDefinitionSchema>
export type TargetDefinitionValue = z.output<typeof targetDefinitionSchema>

/** What a client may send as a target: a definition, or CSV text the server turns into one. */
export const targetInputSchema = z.discriminatedUnion('kind', [
  asce7TargetSchema,
  en1998TargetSchema,
  userTargetSchema,
  userCsvTargetSchema,
])
export type TargetInput = z.input<typeof targetInputSchema>

const periodsS = z
  .array(z.number({ error: 'Each period must be a number.' }).min(0, 'Periods must be at least 0.').max(100))
  .min(1, 'Give at least one period.')
  .max(MAX_TARGET_POINTS, `Give at most ${MAX_TARGET_POINTS} periods.`)
  .optional()

/**
 * POST /api/targets/preview: a code target, or a user target as CSV text, plus the periods to
 * evaluate it at (the default grid if absent). A user target already given as points needs no
 * preview: its points are what would be drawn.
 */
export const targetPreviewBodySchema = z.discriminatedUnion('kind', [
  z.strictObject({ ...asce7Shape, periodsS }).refine(...asce7Refinement),
  z.strictObject({ ...en1998Shape, periodsS }),
  z.strictObject({ ...userCsvShape, periodsS }),
])
export type TargetPreviewBody = z.input<typeof targetPreviewBodySchema>

/** The answer of a preview. Ordinates where the target is not defined are null. */
export const targetPreviewSchema = z.object({
  periodsS: z.array(z.number()),
  saG: z.array(z.number().nullable()),
  label: z.string(),
  notes: z.array(z.string()),
  beyondDefinedRange: z.boolean(),
  /** The definition evaluated (a CSV comes back as its points, ready to save). */
  definition: targetDefinitionSchema,
})
export type TargetPreview = z.infer<typeof targetPreviewSchema>

/** POST /api/targets */
export const createTargetBodySchema = z.strictObject({
  name: nameInputSchema('Give the target a name.'),
  projectId: idSchema.optional(),
  definition: targetInputSchema,
})
export type CreateTargetBody = z.input<typeof createTargetBodySchema>

/** A saved target as the API answers it. */
export const targetSchema = z.object({
  id: z.string(),
  projectId: z.string(),
  name: z.string(),
  definition: targetDefinitionSchema,
  label: z.string(),
  createdBy: namedIdSchema,
  createdAt: z.number(),
})
export type Target = z.infer<typeof targetSchema>

/** GET /api/targets */
export const targetListQuerySchema = z.strictObject({ projectId: idSchema.optional() })
export const targetListSchema = listOf(targetSchema)
export type TargetList = z.infer<typeof targetListSchema>
