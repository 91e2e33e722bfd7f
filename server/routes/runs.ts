import { Router, type Response } from 'express'
import { fileUnitsQuerySchema } from '../../shared/schemas/me.js'
import { idParamsSchema } from '../../shared/schemas/common.js'
import {
  isFinished,
  runListQuerySchema,
  runRequestSchema,
  type RunStatusEvent,
} from '../../shared/schemas/runs.js'
import { plotExportQuerySchema } from '../../shared/schemas/sheets.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
import type { RunEvent } from '../runs/runEvents.js'
import { exportSheet } from '../services/exports.js'
import { createRun, getRun, getRunSpectrum, listRuns } from '../services/runs.js'

/** How often an open event stream gets a comment line, so proxies keep it open. */
const HEARTBEAT_MS = 15_000

function sendEvent(res: Response, event: RunEvent) {
  const { type, ...data } = event
  res.write(`event: ${type}\ndata: ${JSON.stringify(data)}\n\n`)
}

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
    const run = getRun(deps.db, memberOf(req).firmId, id)
    res.writeHead(200, {
      'content-type': 'text/event-stream; charset=utf-8',
      'cache-control': 'no-cache, no-transform',
      connection: 'keep-alive',
      'x-accel-buffering': 'no',
    })
    const current: RunStatusEvent = { status: run.status, progress: run.progress, error: run.error }
    sendEvent(res, { type: 'status', runId: id, ...current })
    if (isFinished(run.status)) {
      res.end()
      return
    }
    const heartbeat = setInterval(() => res.write(': keep-alive\n\n'), HEARTBEAT_MS)
    const unsubscribe =
      deps.runQueue?.subscribe(id, (event) => {
        sendEvent(res, event)
        if (event.type === 'status' && isFinished(event.status)) close()
      }) ?? (() => {})
    function close() {
      clearInterval(heartbeat)
      unsubscribe()
      res.end()
    }
    req.on('close', close)
  })

  return router
}
