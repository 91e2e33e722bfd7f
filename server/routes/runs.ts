import { Router, type Response } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import {
  createPairRunBodySchema,
  createRunBodySchema,
  isFinished,
  runListQuerySchema,
  type RunStatusEvent,
} from '../../shared/schemas/runs.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireMember, requireRole } from '../middleware/auth.js'
import type { RunEvent } from '../runs/runQueue.js'
import { runSpectrumCsv } from '../services/runSpectrumCsv.js'
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

  // Role table (accounts issue): engineers start runs, checkers for independent re-runs; an admin only when also one of these.
  router.post('/runs', requireRole('engineer', 'checker'), (req, res) => {
    const isPair = typeof req.body === 'object' && req.body !== null && 'pairId' in req.body
    const body = isPair ? createPairRunBodySchema.parse(req.body) : createRunBodySchema.parse(req.body)
    const run = createRun(deps.db, memberOf(req), body)
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

  router.get('/runs/:id/spectrum.csv', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const csv = runSpectrumCsv(deps.db, memberOf(req).firmId, id)
    res.type('text/csv; charset=utf-8')
    res.attachment(csv.fileName)
    res.send(csv.text)
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
