import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import {
  reviewCommentBodySchema,
  reviewDecisionBodySchema,
  reviewListQuerySchema,
  submitReviewBodySchema,
} from '../../shared/schemas/reviews.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireMember, requireRole } from '../middleware/auth.js'
import { addReviewComment, decideReview, getReview, listReviews, submitReview } from '../services/reviews.js'

export function reviewsRouter(deps: AppDeps) {
  const router = Router()

  router.get('/reviews', requireMember, (req, res) => {
    res.json({ items: listReviews(deps.db, memberOf(req), reviewListQuerySchema.parse(req.query)) })
  })

  router.get('/reviews/:id', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    res.json(getReview(deps.db, memberOf(req).firmId, id))
  })

  // Role table (accounts issue): engineers submit their own work; checkers decide, never on their own.
  router.post('/reviews', requireRole('engineer'), (req, res) => {
    const { review, created } = submitReview(deps.db, memberOf(req), submitReviewBodySchema.parse(req.body))
    res.status(created ? 201 : 200).json(review)
  })

  router.post('/reviews/:id/decision', requireRole('checker'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    res.json(decideReview(deps.db, memberOf(req), id, reviewDecisionBodySchema.parse(req.body)))
  })

  // The thread is between the people doing and checking the work.
  router.post('/reviews/:id/comments', requireRole('engineer', 'checker'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    res
      .status(201)
      .json(addReviewComment(deps.db, memberOf(req), id, reviewCommentBodySchema.parse(req.body)))
  })

  return router
}
