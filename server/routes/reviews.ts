import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import {
  reviewCommentBodySchema,
  reviewDecisionBodySchema,
  reviewListQuerySchema,
  submitReviewBodySchema,
} from '../../shared/schemas/reviews.js'
import type { AppDeps } from '../deps.js'
import { linkOrigin } from '../mail/links.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
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

  router.post('/reviews', requireAction('reviews.submit'), (req, res) => {
    const body = submitReviewBodySchema.parse(req.body)
    const { review, created } = submitReview(deps.db, memberOf(req), body, linkOrigin(req, deps.config))
    deps.mailDispatcher?.wake()
    res.status(created ? 201 : 200).json(review)
  })

  router.post('/reviews/:id/decision', requireAction('reviews.decide'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const body = reviewDecisionBodySchema.parse(req.body)
    const review = decideReview(deps.db, memberOf(req), id, body, linkOrigin(req, deps.config))
    deps.mailDispatcher?.wake()
    res.json(review)
  })

  router.post('/reviews/:id/comments', requireAction('reviews.comment'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    res
      .status(201)
      .json(addReviewComment(deps.db, memberOf(req), id, reviewCommentBodySchema.parse(req.body)))
  })

  return router
}
