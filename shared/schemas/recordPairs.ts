import { z } from 'zod'
import { idSchema } from './common.js'

/** POST /api/record-pairs */
export const createRecordPairBodySchema = z.strictObject({
  recordIds: z.tuple([idSchema, idSchema], { error: 'Give the ids of exactly two records.' }),
  name: z
    .string()
    .trim()
    .min(1, 'The name cannot be blank.')
    .max(200, 'Use at most 200 characters.')
    .optional(),
})
export type CreateRecordPairBody = z.infer<typeof createRecordPairBodySchema>

/** The answer of POST /api/record-pairs (201). */
export const recordPairSchema = z.object({
  id: z.string(),
  recordIds: z.tuple([z.string(), z.string()]),
  name: z.string(),
})
export type RecordPair = z.infer<typeof recordPairSchema>

export const recordPairDetailSchema = recordPairSchema.extend({
  projectId: z.string(),
  createdBy: z.string(),
  createdAt: z.number(),
})
export type RecordPairDetail = z.infer<typeof recordPairDetailSchema>

/** GET /api/record-pairs */
export const recordPairListSchema = z.object({ items: z.array(recordPairDetailSchema) })
export type RecordPairList = z.infer<typeof recordPairListSchema>
