import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import { createProcessedRecordSchema, processingSettingsSchema } from '../../shared/schemas/processing.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
import { createProcessedRecord, previewProcessing, recordFourier } from '../services/recordProcessing.js'

/** Baseline correction and filtering of records: engineers and checkers; no credits are spent. */
export function recordProcessingRouter(deps: AppDeps) {
  const router = Router()

  router.post('/records/:id/processing/preview', requireAction('records.upload'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const settings = processingSettingsSchema.parse(req.body ?? {})
    res.json(previewProcessing(deps.db, memberOf(req).firmId, id, settings))
  })

  router.post('/records/:id/processed', requireAction('records.upload'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const body = createProcessedRecordSchema.parse(req.body ?? {})
    res.status(201).json(createProcessedRecord(deps.db, memberOf(req), id, body))
  })

  router.get('/records/:id/fourier', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    res.json(recordFourier(deps.db, memberOf(req).firmId, id))
  })

  return router
}
