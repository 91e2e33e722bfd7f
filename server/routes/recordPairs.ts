import { Router } from 'express'
import { createRecordPairBodySchema } from '../../shared/schemas/recordPairs.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireMember, requireRole } from '../middleware/auth.js'
import { createRecordPair, listRecordPairs } from '../services/recordPairs.js'

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

  return router
}
