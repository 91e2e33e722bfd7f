import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import { createRecordPairBodySchema } from '../../shared/schemas/recordPairs.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
import { createRecordPair, listRecordPairs, removeRecordPair } from '../services/recordPairs.js'

export function recordPairsRouter(deps: AppDeps) {
  const router = Router()

  router.get('/record-pairs', requireMember, (req, res) => {
    res.json({ items: listRecordPairs(deps.db, memberOf(req).firmId) })
  })

  router.post('/record-pairs', requireAction('pairs.manage'), (req, res) => {
    const body = createRecordPairBodySchema.parse(req.body)
    res.status(201).json(createRecordPair(deps.db, memberOf(req), body))
  })

  router.delete('/record-pairs/:id', requireAction('pairs.manage'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    removeRecordPair(deps.db, memberOf(req), id)
    res.status(204).end()
  })

  return router
}
