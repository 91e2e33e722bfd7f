import { EventEmitter } from 'node:events'
import { Job, Queue, QueueEvents } from 'bullmq'
import { Redis } from 'ioredis'
import { workerReplySchema, type WorkerRequest } from '../../shared/schemas/spectrumWorker.js'
import { ComputeConsumer } from './computeConsumer.js'
import { decodeFromQueue, encodeForQueue } from './queueCodec.js'
import { RUN_QUEUE_NAME, parseRunJobId, runJobId, type RunJobData } from './redisJobs.js'
import type { RunEvent } from './runEvents.js'
import type { QueueHealth, RunScheduler } from './runScheduler.js'
import type { ClaimedRun, RunStore } from './runStore.js'
import { workerRequestFor } from './workerRequest.js'

export interface RedisRunQueueOptions {
  store: RunStore
  redisUrl: string
  runTimeLimitS: number
  /** Threads computing runs in this process too (0: compute nodes do it all). */
  localThreads: number
  lockMs: number
  stalledMs: number
  /** How often SQLite and the queue are compared (lost events, Redis outages, restarts). */
  reconcileMs?: number
  workerFile?: URL
  log?: (line: string) => void
}

/**
 * The web process's side of the distributed run queue (with REDIS_URL). SQLite stays the
 * record of every run; BullMQ on Redis only carries work to compute nodes
 * (computeConsumer.ts), so any number of machines can compute.
 *
 * - Handing off: a queued run is claimed in SQLite (running, attempt + 1) and added as job
 *   `<run>-a<attempt>` with its samples. The Queue's connection has `enableOfflineQueue: false`,
 *   so with Redis down the add fails at once, the claim is undone (the attempt not counted) and
 *   the run waits, queued, for the next reconcile: a request never waits on Redis.
 * - Finishing: results come back as job return values. Completion events are the fast path;
 *   a reconcile at start and every `reconcileMs` also reads the jobs of every run SQLite has
 *   unfinished, so results sent while this process was down are collected, jobs lost with
 *   Redis are added again, and queued runs are handed off. Results are stored and credits
 *   spent through the same run store as the embedded queue, guarded by the attempt: once.
 * - Lost computations: a job fails in BullMQ only when its node died (engine errors and thread
 *   crashes come back as results). The run is then retried or failed by the run's own
 *   attempt limit (sqliteRunStore.ts), the one rule for both queues.
 */
export class RedisRunQueue implements RunScheduler {
  readonly mode = 'redis' as const
  private readonly store: RunStore
  private readonly queue: Queue
  private readonly queueEvents: QueueEvents
  private readonly queueConnection: Redis
  private readonly emitter = new EventEmitter()
  private readonly log: (line: string) => void
  private readonly timeLimitMs: number
  private readonly reconcileMs: number
  private readonly consumer?: ComputeConsumer
  /** Threads computing runs in this process (0 when compute nodes do it all). */
  readonly workerCount: number
  private timer?: NodeJS.Timeout
  private reconciling?: Promise<void>
  private again = false
  private stopped = false
  private redisDownLogged = false

  constructor(options: RedisRunQueueOptions) {
    this.store = options.store
    this.log = options.log ?? (() => {})
    this.timeLimitMs = options.runTimeLimitS * 1000
    this.reconcileMs = options.reconcileMs ?? 2000
    this.workerCount = options.localThreads
    this.queueConnection = new Redis(options.redisUrl, { enableOfflineQueue: false, maxRetriesPerRequest: 1 })
    this.queueConnection.on('error', () => {})
    this.queue = new Queue(RUN_QUEUE_NAME, { connection: this.queueConnection })
    this.queue.on('error', () => {})
    this.queueEvents = new QueueEvents(RUN_QUEUE_NAME, {
      connection: new Redis(options.redisUrl, { maxRetriesPerRequest: null }),
    })
    this.queueEvents.on('error', () => {})
    this.queueEvents.on('active', ({ jobId }) => {
      const ids = parseRunJobId(jobId)
      if (ids) this.publish({ type: 'status', runId: ids.runId, status: 'running', progress: 0, error: null })
    })
    this.queueEvents.on('progress', ({ jobId, data }) => this.onProgress(jobId, data))
    this.queueEvents.on('completed', ({ jobId }) => void this.collect(jobId))
    this.queueEvents.on('failed', ({ jobId }) => void this.collect(jobId))
    this.queueConnection.on('ready', () => this.kick())
    if (options.localThreads > 0)
      this.consumer = new ComputeConsumer({
        redisUrl: options.redisUrl,
        threads: options.localThreads,
        lockMs: options.lockMs,
        stalledMs: options.stalledMs,
        workerFile: options.workerFile,
        log: this.log,
      })
    this.emitter.setMaxListeners(0)
  }

  /** Hands off what SQLite has waiting, collects what finished, and keeps doing so. */
  start(): void {
    this.kick()
    this.timer = setInterval(() => this.kick(), this.reconcileMs)
    this.timer.unref()
  }

  /** Call after a run is created: hands it off now rather than at the next reconcile. */
  kick(): void {
    if (this.stopped) return
    if (this.reconciling) {
      this.again = true
      return
    }
    this.reconciling = this.reconcile()
      .catch((err: unknown) =>
        this.log(`Run queue: reconcile failed: ${err instanceof Error ? err.message : err}`),
      )
      .finally(() => {
        this.reconciling = undefined
        if (this.again) {
          this.again = false
          this.kick()
        }
      })
  }

  /** Resolves when no reconcile is in progress (tests). */
  async idle(): Promise<void> {
    while (this.reconciling) await this.reconciling
  }

  subscribe(runId: string, listener: (event: RunEvent) => void): () => void {
    const name = `run:${runId}`
    this.emitter.on(name, listener)
    return () => this.emitter.off(name, listener)
  }

  async health(): Promise<QueueHealth> {
    if (this.queueConnection.status !== 'ready') return { queue: 'redis', redisReachable: false, workers: 0 }
    try {
      const workers = await this.queue.getWorkers()
      return { queue: 'redis', redisReachable: true, workers: workers.length }
    } catch {
      return { queue: 'redis', redisReachable: false, workers: 0 }
    }
  }

  /** Stops handing off; a local consumer finishes the job it computes. Queued work stays in SQLite and Redis. */
  async stop(): Promise<void> {
    this.stopped = true
    clearInterval(this.timer)
    await this.idle()
    await Promise.allSettled([this.consumer?.close(), this.queueEvents.close(), this.queue.close()])
  }

  private redisReady(): boolean {
    if (this.queueConnection.status === 'ready') {
      this.redisDownLogged = false
      return true
    }
    if (!this.redisDownLogged)
      this.log('Run queue: Redis is unreachable; runs wait in SQLite until it is back.')
    this.redisDownLogged = true
    return false
  }

  private async reconcile(): Promise<void> {
    if (!this.redisReady()) return
    for (const run of this.store.running()) {
      if (this.stopped) return
      await this.collect(runJobId(run), run)
    }
    for (;;) {
      if (this.stopped || !this.redisReady()) return
      const run = this.store.claim()
      if (!run) return
      if (!(await this.handOff(run))) return
    }
  }

  /** Adds a claimed run's job. On failure (Redis down) the claim is undone and false answered. */
  private async handOff(run: ClaimedRun): Promise<boolean> {
    let request: WorkerRequest
    try {
      request = workerRequestFor(run, this.store.load(run), run.settings.periodsS)
    } catch (err) {
      this.finishFailed(run, err instanceof Error ? err.message : String(err))
      return true
    }
    const data: RunJobData = {
      runId: run.id,
      attempt: run.attempt,
      timeLimitMs: this.timeLimitMs,
      request: encodeForQueue(request),
    }
    try {
      await this.queue.add('run', data, {
        jobId: runJobId(run),
        removeOnComplete: false,
        removeOnFail: false,
      })
      return true
    } catch (err) {
      this.store.putBack(run)
      this.log(`Run queue: run ${run.id} waits in SQLite (${err instanceof Error ? err.message : err}).`)
      return false
    }
  }

  /**
   * Settles one job against its run: stores a result, fails or retries a lost computation, and
   * adds the job again when Redis no longer has it. Safe to call twice for the same job: every
   * write is guarded by the attempt.
   */
  private async collect(jobId: string, known?: ClaimedRun): Promise<void> {
    const ids = parseRunJobId(jobId)
    if (!ids) return
    const run = known ?? this.store.running().find((r) => r.id === ids.runId && r.attempt === ids.attempt)
    if (!run) return
    // The state first, then the job: a job read while still active and found completed a moment
    // later has no return value yet (a reconcile racing the worker's finish once failed a good
    // run that way). A finished job no longer changes, so reading it after its state is safe.
    let state: Awaited<ReturnType<Queue['getJobState']>>
    try {
      state = await this.queue.getJobState(jobId)
    } catch {
      return
    }
    if (state === 'unknown') {
      await this.handOff(run)
      return
    }
    if (state !== 'completed' && state !== 'failed') return
    let job: Job | undefined
    try {
      job = await Job.fromId(this.queue, jobId)
    } catch {
      return
    }
    // Removed since its state was read: another collect of the same job settled it.
    if (!job) return
    if (state === 'completed') {
      const parsed = workerReplySchema.safeParse(decodeFromQueue(job.returnvalue))
      if (!parsed.success || parsed.data.type === 'progress') {
        this.log(
          `Run ${run.id}: job ${jobId} completed with an unreadable result: ${parsed.success ? 'a progress message' : parsed.error.message}`,
        )
        this.finishFailed(run, 'The computation sent back a result that could not be read.')
      } else if (parsed.data.type === 'error')
        this.finishFailed(run, `The computation failed: ${parsed.data.message}`)
      else {
        const finishedAt = Date.now()
        try {
          if (
            this.store.succeed(run, parsed.data, {
              queuedMs: (job.processedOn ?? run.startedAt) - run.createdAt,
              computeMs: parsed.data.computeMs,
              runMs: finishedAt - run.startedAt,
              parts: 1,
            })
          )
            this.publish({ type: 'status', runId: run.id, status: 'succeeded', progress: 1, error: null })
        } catch (err) {
          this.log(
            `Run ${run.id}: storing the result failed: ${err instanceof Error ? err.stack : String(err)}`,
          )
          this.finishFailed(run, 'The result could not be stored.')
        }
      }
      await job.remove().catch(() => {})
    } else if (state === 'failed') {
      const why = job.failedReason || 'the computation was lost'
      const outcome = this.store.retry(run, why)
      if (outcome === 'queued') {
        this.log(`Run ${run.id}: attempt ${run.attempt} was lost (${why}); queued again.`)
        this.publish({ type: 'status', runId: run.id, status: 'queued', progress: 0, error: null })
        this.kick()
      } else if (outcome === 'failed') {
        this.publish({
          type: 'status',
          runId: run.id,
          status: 'failed',
          progress: 0,
          error: `The run was interrupted ${run.attempt} times and was stopped.`,
        })
      }
      await job.remove().catch(() => {})
    }
  }

  private onProgress(jobId: string, data: unknown): void {
    const ids = parseRunJobId(jobId)
    if (!ids || typeof data !== 'number' || !(data > 0 && data < 1)) return
    this.store.progress({ id: ids.runId, attempt: ids.attempt }, data)
    this.publish({ type: 'progress', runId: ids.runId, progress: data })
  }

  private finishFailed(run: ClaimedRun, message: string): void {
    if (this.store.fail(run, message))
      this.publish({ type: 'status', runId: run.id, status: 'failed', progress: 0, error: message })
  }

  private publish(event: RunEvent): void {
    this.emitter.emit(`run:${event.runId}`, event)
  }
}
