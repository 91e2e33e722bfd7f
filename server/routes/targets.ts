import { Router } from 'express'
import {
  createTargetBodySchema,
  targetListQuerySchema,
  targetPreviewBodySchema,
} from '../../shared/schemas/targets.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
import { createTarget, listTargets, previewTarget } from '../services/targets.js'

export function targetsRouter(deps: AppDeps) {
  const router = Router()

  // A preview computes and stores nothing, so every member may draw one.
  router.post('/targets/preview', requireMember, (req, res) => {
    res.json(previewTarget(targetPreviewBodySchema.parse(req.body)))
  })

  router.get('/targets', requireMember, (req, res) => {
    const { projectId } = targetListQuerySchema.parse(req.query)
    res.json({ items: listTargets(deps.db, memberOf(req).firmId, projectId) })
  })

  router.post('/targets', requireAction('targets.create'), (req, res) => {
    res.status(201).json(createTarget(deps.db, memberOf(req), createTargetBodySchema.parse(req.body)))
  })

  return router
}
