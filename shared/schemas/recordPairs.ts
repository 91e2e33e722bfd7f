import { z } from 'zod'
import { idSchema, listOf, nameInputSchema } from './common.js'

/** POST /api/record-pairs */
export const createRecordPairBodySchema = z.strictObject({
  recordIds: z.tuple([idSchema, idSchema], { error: 'Give the ids of exactly two records.' }),
  name: nameInputSchema('The name cannot be blank.').optional(),
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
export const recordPairListSchema = listOf(recordPairDetailSchema)
export type RecordPairList = z.infer<typeof recordPairListSchema>
