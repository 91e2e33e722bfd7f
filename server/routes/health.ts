import { Router } from 'express'
import type { AppDeps } from '../deps.js'

/** 200 while the web process serves, with the state of the run queue (embedded, or Redis and its workers). */
export function healthRouter(deps: AppDeps) {
  const router = Router()
  router.get('/health', async (_req, res) => {
    const queue = deps.runQueue ? await deps.runQueue.health() : undefined
    res.json({ ok: true, ...queue })
  })
  return router
}
