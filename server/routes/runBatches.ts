import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import { createRunBatchBodySchema, runBatchListQuerySchema } from '../../shared/schemas/runBatches.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
import { streamRunEvents } from './eventStream.js'
import { createRunBatch, getRunBatch, listRunBatches } from '../services/runBatches.js'

export function runBatchesRouter(deps: AppDeps) {
  const router = Router()

  router.get('/run-batches', requireMember, (req, res) => {
    const query = runBatchListQuerySchema.parse(req.query)
    res.json({ items: listRunBatches(deps.db, memberOf(req).firmId, query) })
  })

  router.post('/run-batches', requireAction('runs.start'), (req, res) => {
    const body = createRunBatchBodySchema.parse(req.body)
    const batch = createRunBatch(deps.db, memberOf(req), body)
    deps.runQueue?.kick()
    res.status(202).json(batch)
  })

  router.get('/run-batches/:id', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    res.json(getRunBatch(deps.db, memberOf(req).firmId, id))
  })

  /**
   * Server-sent events: each run's current `status` first, then the runs' `progress` and
   * `status` events as /api/runs/:id/events sends them (each names its runId). The stream
   * closes once every run has finished.
   */
  router.get('/run-batches/:id/events', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const batch = getRunBatch(deps.db, memberOf(req).firmId, id)
    streamRunEvents(req, res, deps.runQueue, batch.runs)
  })

  return router
}
