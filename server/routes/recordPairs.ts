import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import { createRecordPairBodySchema } from '../../shared/schemas/recordPairs.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireMember, requireRole } from '../middleware/auth.js'
import { createRecordPair, listRecordPairs, removeRecordPair } from '../services/recordPairs.js'

export function recordPairsRouter(deps: AppDeps) {
  const router = Router()

  router.get('/record-pairs', requireMember, (req, res) => {
    res.json({ items: listRecordPairs(deps.db, memberOf(req).firmId) })
  })

  // Role table (accounts issue): engineers and checkers make pairs; an admin only when also an engineer.
  router.post('/record-pairs', requireRole('engineer', 'checker'), (req, res) => {
    const body = createRecordPairBodySchema.parse(req.body)
    res.status(201).json(createRecordPair(deps.db, memberOf(req), body))
  })

  // Whoever may make pairs may delete one that no run uses.
  router.delete('/record-pairs/:id', requireRole('engineer', 'checker'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    removeRecordPair(deps.db, memberOf(req), id)
    res.status(204).end()
  })

  return router
}
