import {
  type Review,
  type ReviewComment,
  type ReviewDecisionBody,
  type ReviewDetail,
  type ReviewListQuery,
  type SubmitReviewBody,
  reviewCommentSchema,
  reviewDetailSchema,
  reviewListSchema,
} from '../../shared/schemas/reviews'
import { apiRequest } from './client'

export type {
  Review,
  ReviewComment,
  ReviewDetail,
  ReviewState,
  ReviewSubjectType,
} from '../../shared/schemas/reviews'

/** `GET /api/reviews`: by state, "mine" (what I submitted), or one subject's review. */
export async function listReviews(query: Partial<ReviewListQuery> = {}): Promise<Review[]> {
  return (await apiRequest('/api/reviews', reviewListSchema, { query })).items
}

/** `GET /api/reviews/:id`: the review with its comment thread. */
export function getReview(id: string): Promise<ReviewDetail> {
  return apiRequest(`/api/reviews/${encodeURIComponent(id)}`, reviewDetailSchema)
}

/** `POST /api/reviews` (engineer, own work): submits, or resubmits after a return. */
export function submitReview(body: SubmitReviewBody): Promise<ReviewDetail> {
  return apiRequest('/api/reviews', reviewDetailSchema, { method: 'POST', body })
}

/** `POST /api/reviews/:id/decision` (checker, never on their own work). */
export function decideReview(id: string, body: ReviewDecisionBody): Promise<ReviewDetail> {
  return apiRequest(`/api/reviews/${encodeURIComponent(id)}/decision`, reviewDetailSchema, {
    method: 'POST',
    body,
  })
}

/** `POST /api/reviews/:id/comments` */
export function addReviewComment(id: string, body: string): Promise<ReviewComment> {
  return apiRequest(`/api/reviews/${encodeURIComponent(id)}/comments`, reviewCommentSchema, {
    method: 'POST',
    body: { body },
  })
}
