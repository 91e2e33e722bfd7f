import { Worker, type Job } from 'bullmq'
import { Redis } from 'ioredis'
import type { WorkerRequest } from '../../shared/schemas/spectrumWorker.js'
import { decodeFromQueue, encodeForQueue } from './queueCodec.js'
import { RUN_QUEUE_NAME, runJobDataSchema } from './redisJobs.js'
import { SpectrumThreads, ThreadLostError } from './spectrumThreads.js'

export interface ComputeConsumerOptions {
  redisUrl: string
  /** Runs computed at once, each on its own worker thread. */
  threads: number
  /** BullMQ's lock on a job being computed (`lockDuration`). */
  lockMs: number
  /** How often this consumer looks for jobs whose computing node died (`stalledInterval`). */
  stalledMs: number
  workerFile?: URL
  log?: (line: string) => void
}

/** The buffers a request carries, to transfer to the thread rather than copy. */
function buffersOf(request: WorkerRequest): ArrayBuffer[] {
  return request.job.kind === 'record' ? [request.job.samples] : [request.job.samples1, request.job.samples2]
}

/**
 * Takes runs off the BullMQ queue and computes them on this process's worker threads: the
 * compute side of the distributed queue, in a compute node (`npm run worker`, no HTTP and no
 * database) or inside the web process. A job carries its samples, so this side shares no files
 * with the web process. Progress goes back through `job.updateProgress`, the result (or the
 * engine's error) as the job's return value; the web process stores it.
 *
 * A job fails in BullMQ only when its node died and the job's lock ran out (a thread that
 * crashes under a live node answers an error, as on the embedded queue). `maxStalledCount: 0` makes a stalled job fail at once instead of
 * being retried here, so retrying is left to one rule, the run's own attempt limit in SQLite
 * (redisRunQueue.ts).
 */
export class ComputeConsumer {
  private readonly threads: SpectrumThreads
  private readonly worker: Worker
  private readonly log: (line: string) => void
  private closing = false

  constructor(options: ComputeConsumerOptions) {
    this.log = options.log ?? (() => {})
    this.threads = new SpectrumThreads({ size: options.threads, workerFile: options.workerFile })
    this.worker = new Worker(RUN_QUEUE_NAME, (job) => this.process(job), {
      connection: new Redis(options.redisUrl, { maxRetriesPerRequest: null }),
      concurrency: options.threads,
      lockDuration: options.lockMs,
      stalledInterval: options.stalledMs,
      maxStalledCount: 0,
      autorun: true,
    })
    this.worker.on('error', (err) => this.log(`Compute node: ${err.message}`))
  }

  /** Resolves when the consumer's connection to Redis is ready. */
  async ready(): Promise<void> {
    await this.worker.waitUntilReady()
  }

  private async process(job: Job): Promise<unknown> {
    const data = runJobDataSchema.parse(job.data)
    const request = decodeFromQueue(data.request) as WorkerRequest
    let lastProgress = 0
    try {
      const reply = await this.threads.compute(request, buffersOf(request), {
        timeLimitMs: data.timeLimitMs,
        onProgress: (progress) => {
          if (progress <= lastProgress) return
          lastProgress = progress
          job.updateProgress(progress).catch(() => {})
        },
      })
      return encodeForQueue(reply)
    } catch (err) {
      // A thread that crashed under a live node fails its run, as on the embedded queue; only a
      // node that dies (its job stalls) has the run retried.
      if (!(err instanceof ThreadLostError) || this.closing) throw err
      return encodeForQueue({ type: 'error', runId: data.runId, message: err.message })
    }
  }

  /** Takes no new job, lets the ones computing finish, then ends the threads (SIGTERM). */
  async close(): Promise<void> {
    this.closing = true
    await this.worker.close()
    await this.threads.close()
  }
}
