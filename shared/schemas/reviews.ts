import { z } from 'zod'
import { REVIEW_DECISIONS, STORED_REVIEW_STATES } from '../vocabulary/reviewStates.js'
import { idSchema, listOf, namedIdSchema } from './common.js'

export { reviewStateSchema, type ReviewState } from '../vocabulary/reviewStates.js'

export const reviewSubjectTypeSchema = z.enum(['run', 'comparison'], {
  error: 'subjectType must be run or comparison.',
})
export type ReviewSubjectType = z.infer<typeof reviewSubjectTypeSchema>

/** POST /api/reviews: submit (or resubmit after a return) a run or comparison for checking. */
export const submitReviewBodySchema = z.strictObject({
  subjectType: reviewSubjectTypeSchema,
  subjectId: idSchema,
})
export type SubmitReviewBody = z.infer<typeof submitReviewBodySchema>

const commentBody = z
  .string()
  .trim()
  .min(1, 'The comment is empty.')
  .max(5000, 'Use at most 5000 characters.')

/** POST /api/reviews/:id/decision */
export const reviewDecisionBodySchema = z
  .strictObject({
    decision: z.enum(REVIEW_DECISIONS, { error: `decision must be one of ${REVIEW_DECISIONS.join(', ')}.` }),
    comment: commentBody.optional(),
  })
  .refine((b) => b.decision !== 'returned' || b.comment !== undefined, {
    message: 'Say why the work is returned: a comment is needed.',
    path: ['comment'],
  })
export type ReviewDecisionBody = z.infer<typeof reviewDecisionBodySchema>

/** POST /api/reviews/:id/comments */
export const reviewCommentBodySchema = z.strictObject({ body: commentBody })
export type ReviewCommentBody = z.infer<typeof reviewCommentBodySchema>

/** GET /api/reviews */
export const reviewListQuerySchema = z.strictObject({
  state: z
    .enum(STORED_REVIEW_STATES, { error: `state must be one of ${STORED_REVIEW_STATES.join(', ')}.` })
    .optional(),
  /** Only reviews the signed-in member submitted ("my submissions"). */
  mine: z.enum(['true', 'false']).optional(),
  subjectType: reviewSubjectTypeSchema.optional(),
  subjectId: idSchema.optional(),
})
export type ReviewListQuery = z.infer<typeof reviewListQuerySchema>

export const reviewCommentSchema = z.object({
  id: z.string(),
  author: namedIdSchema,
  body: z.string(),
  createdAt: z.number(),
})
export type ReviewComment = z.infer<typeof reviewCommentSchema>

/** A review as the API answers it. */
export const reviewSchema = z.object({
  id: z.string(),
  subjectType: reviewSubjectTypeSchema,
  subjectId: z.string(),
  /** The run's record or pair name, or the comparison's name. */
  subjectName: z.string(),
  /** Who made the work (ran the run or created the comparison). */
  subjectAuthor: namedIdSchema,
  /** The work's revision now: a change to returned work raises it, and the thread says so. */
  subjectRevision: z.number().int(),
  state: z.enum(STORED_REVIEW_STATES),
  submittedBy: namedIdSchema,
  submittedAt: z.number(),
  decidedBy: namedIdSchema.nullable(),
  decidedAt: z.number().nullable(),
  commentCount: z.number().int(),
  createdAt: z.number(),
})
export type Review = z.infer<typeof reviewSchema>

/** GET /api/reviews/:id: the review with its thread, oldest comment first. */
export const reviewDetailSchema = reviewSchema.extend({ comments: z.array(reviewCommentSchema) })
export type ReviewDetail = z.infer<typeof reviewDetailSchema>

export const reviewListSchema = listOf(reviewSchema)
export type ReviewList = z.infer<typeof reviewListSchema>
