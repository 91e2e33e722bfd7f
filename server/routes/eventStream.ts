import type { Request, Response } from 'express'
import { isFinished, type RunStatus } from '../../shared/schemas/runs.js'
import type { RunEvent } from '../runs/runEvents.js'
import type { RunScheduler } from '../runs/runScheduler.js'

/** How often an open event stream gets a comment line, so proxies keep it open. */
const HEARTBEAT_MS = 15_000

export interface EventStream {
  /** Writes one event: `event:` is its type, `data:` the rest as JSON. */
  send(event: RunEvent): void
  /** Runs `cleanup` when the stream closes, from either side. */
  onClose(cleanup: () => void): void
  /** Ends the stream (once; later calls do nothing). */
  close(): void
}

/** Starts a server-sent event stream (HTML Living Standard, "Server-sent events") with a heartbeat. */
export function openEventStream(req: Request, res: Response): EventStream {
  res.writeHead(200, {
    'content-type': 'text/event-stream; charset=utf-8',
    'cache-control': 'no-cache, no-transform',
    connection: 'keep-alive',
    'x-accel-buffering': 'no',
  })
  const cleanups: (() => void)[] = []
  const heartbeat = setInterval(() => res.write(': keep-alive\n\n'), HEARTBEAT_MS)
  let closed = false
  const close = () => {
    if (closed) return
    closed = true
    clearInterval(heartbeat)
    for (const cleanup of cleanups) cleanup()
    res.end()
  }
  req.on('close', close)
  return {
    send(event) {
      const { type, ...data } = event
      if (!closed) res.write(`event: ${type}\ndata: ${JSON.stringify(data)}\n\n`)
    },
    onClose: (cleanup) => cleanups.push(cleanup),
    close,
  }
}

/** A run as its event stream first reports it. */
export interface RunSnapshot {
  id: string
  status: RunStatus
  progress: number
  error: string | null
}

/**
 * Streams some runs' events: each run's current `status` first, then the `progress` and
 * `status` events the queue publishes (each names its runId). The stream closes once every
 * run has finished; without a queue it stays open on its heartbeat.
 */
export function streamRunEvents(
  req: Request,
  res: Response,
  runQueue: RunScheduler | undefined,
  runs: readonly RunSnapshot[],
): void {
  const stream = openEventStream(req, res)
  const open = new Set<string>()
  for (const run of runs) {
    const { id: runId, status, progress, error } = run
    stream.send({ type: 'status', runId, status, progress, error })
    if (!isFinished(status)) open.add(runId)
  }
  if (open.size === 0) return stream.close()
  for (const runId of open) {
    const unsubscribe =
      runQueue?.subscribe(runId, (event) => {
        stream.send(event)
        if (event.type !== 'status' || !isFinished(event.status)) return
        open.delete(runId)
        unsubscribe()
        if (open.size === 0) stream.close()
      }) ?? (() => {})
    stream.onClose(unsubscribe)
  }
}
