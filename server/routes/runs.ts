import { Router } from 'express'
import { fileUnitsQuerySchema } from '../../shared/schemas/me.js'
import { idParamsSchema } from '../../shared/schemas/common.js'
import { runListQuerySchema, runRequestSchema } from '../../shared/schemas/runs.js'
import { plotExportQuerySchema } from '../../shared/schemas/sheets.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
import { exportSheet } from '../services/exports.js'
import { createRun, getRun, getRunSpectrum, listRuns } from '../services/runs.js'
import { streamRunEvents } from './eventStream.js'

export function runsRouter(deps: AppDeps) {
  const router = Router()

  router.get('/runs', requireMember, (req, res) => {
    const query = runListQuerySchema.parse(req.query)
    res.json({ items: listRuns(deps.db, memberOf(req).firmId, query) })
  })

  router.post('/runs', requireAction('runs.start'), (req, res) => {
    const run = createRun(deps.db, memberOf(req), runRequestSchema.parse(req.body))
    deps.runQueue?.kick()
    res.status(202).json(run)
  })

  router.get('/runs/:id', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    res.json(getRun(deps.db, memberOf(req).firmId, id))
  })

  router.get('/runs/:id/spectrum', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const { run, result } = getRunSpectrum(deps.db, memberOf(req).firmId, id)
    res.json({ ...result, settings: run.settings })
  })

  /** The run's CSV: the same file as its CSV export (server/exports/ordinatesCsv.ts). */
  router.get('/runs/:id/spectrum.csv', requireMember, async (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const { units } = fileUnitsQuerySchema.parse(req.query)
    const file = await exportSheet(
      deps.db,
      memberOf(req),
      'run',
      id,
      'csv',
      plotExportQuerySchema.parse({ units }),
    )
    res.type(file.contentType)
    res.attachment(file.fileName)
    res.set('cache-control', 'private, no-store')
    res.send(file.body)
  })

  /** Server-sent events: `progress` and `status` until the run ends, then the stream closes. */
  router.get('/runs/:id/events', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    streamRunEvents(req, res, deps.runQueue, [getRun(deps.db, memberOf(req).firmId, id)])
  })

  return router
}
