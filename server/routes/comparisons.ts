import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import {
  comparisonListQuerySchema,
  createComparisonBodySchema,
  previewComparisonBodySchema,
  updateComparisonBodySchema,
} from '../../shared/schemas/comparisons.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
import {
  createComparison,
  getComparisonView,
  listComparisons,
  previewComparison,
  updateComparison,
} from '../services/comparisons.js'

export function comparisonsRouter(deps: AppDeps) {
  const router = Router()

  router.get('/comparisons', requireMember, (req, res) => {
    const { projectId } = comparisonListQuerySchema.parse(req.query)
    res.json({ items: listComparisons(deps.db, memberOf(req).firmId, projectId) })
  })

  // A preview stores nothing, so every member may draw one.
  router.post('/comparisons/preview', requireMember, (req, res) => {
    res.json(previewComparison(deps.db, memberOf(req).firmId, previewComparisonBodySchema.parse(req.body)))
  })

  router.get('/comparisons/:id', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    res.json(getComparisonView(deps.db, memberOf(req).firmId, id))
  })

  router.post('/comparisons', requireAction('comparisons.create'), (req, res) => {
    res.status(201).json(createComparison(deps.db, memberOf(req), createComparisonBodySchema.parse(req.body)))
  })

  router.patch('/comparisons/:id', requireAction('comparisons.edit'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    res.json(updateComparison(deps.db, memberOf(req), id, updateComparisonBodySchema.parse(req.body)))
  })

  return router
}
