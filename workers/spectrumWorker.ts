/**
 * Worker thread of the run queue: takes one run at a time by message, computes its spectrum with
 * the engine and posts the result with its buffers transferred. The thread stays up between
 * runs; the queue ends it when it has been idle. No logic of its own.
 */
import { parentPort } from 'node:worker_threads'
import { curveBuffers, workerRequestSchema, type WorkerReply } from '../shared/schemas/spectrumWorker.js'
import { computeSpectrum } from '../shared/spectra/computeSpectrum.js'

/** Progress is posted in 1/PROGRESS_STEPS steps (5%), so a run sends at most 19 updates. */
const PROGRESS_STEPS = 20

if (!parentPort) throw new Error('spectrumWorker must run as a worker thread')
const port = parentPort

function post(reply: WorkerReply, transfer: ArrayBuffer[] = []) {
  port.postMessage(reply, transfer)
}

port.on('message', (message: unknown) => {
  const parsed = workerRequestSchema.safeParse(message)
  if (!parsed.success) {
    const runId = (message as { runId?: unknown } | null)?.runId
    post({
      type: 'error',
      runId: typeof runId === 'string' ? runId : '',
      message: 'The run message was not valid.',
    })
    return
  }
  const { runId, job, settings } = parsed.data
  const startedAt = performance.now()
  let postedSteps = 0
  const onProgress = (fraction: number) => {
    const steps = Math.floor(fraction * PROGRESS_STEPS)
    if (steps <= postedSteps || steps >= PROGRESS_STEPS) return
    postedSteps = steps
    post({ type: 'progress', runId, progress: steps / PROGRESS_STEPS })
  }
  try {
    const subject =
      job.kind === 'pair'
        ? {
            accel1MPerS2: new Float64Array(job.samples1),
            accel2MPerS2: new Float64Array(job.samples2),
            dtS: job.dtS,
          }
        : { accelMPerS2: new Float64Array(job.samples), dtS: job.dtS }
    const computation = computeSpectrum(subject, { ...settings, onProgress })
    const buffers = new Set<ArrayBuffer>([computation.periodsS.buffer as ArrayBuffer])
    for (const curve of computation.curves) for (const buffer of curveBuffers(curve)) buffers.add(buffer)
    post({ type: 'result', runId, computation, computeMs: performance.now() - startedAt }, [...buffers])
  } catch (err) {
    post({ type: 'error', runId, message: err instanceof Error ? err.message : String(err) })
  }
})
