import { existsSync } from 'node:fs'
import { availableParallelism } from 'node:os'
import { fileURLToPath } from 'node:url'
import type { Worker } from 'node:worker_threads'
import { workerReplySchema } from '../../shared/schemas/spectrumWorker.js'
import type { Db } from '../db/client.js'
import { isCompiled } from '../projectRoot.js'
import { ActiveRun, type Part } from './activeRun.js'
import { type RunEvent, RunEvents } from './runEvents.js'
import type { QueueHealth } from './runScheduler.js'
import type { ClaimedRun, RunStore, WorkerResult } from './runStore.js'
import { sqliteRunStore } from './sqliteRunStore.js'
import { type Thread, WorkerThreads } from './workerThreads.js'

export type { RunEvent } from './runEvents.js'

export interface RunQueueOptions {
  db: Db
  /** Where runs come from and where their outcomes go; defaults to the runs table of `db`. */
  store?: RunStore
  /** Threads computing at once; defaults to the available cores. */
  workerCount?: number
  /** A run still computing after this long fails and its worker is terminated. */
  runTimeLimitS: number
  /** A worker with nothing to do exits after this long. */
  idleMs?: number
  /** The worker entry point; defaults to the compiled .js in production, the tsx shim otherwise. */
  workerFile?: URL
  log?: (line: string) => void
}

/**
 * The worker entry point. Node 20 cannot start a Worker from a .ts file, even under tsx
 * (STACK.md), so development and tests start a .mjs shim that registers tsx first.
 */
export function defaultWorkerFile(): URL {
  return isCompiled()
    ? new URL('../../workers/spectrumWorker.js', import.meta.url)
    : new URL('../../workers/spectrumWorker.dev.mjs', import.meta.url)
}

/**
 * Computes queued runs on worker threads. Its parts:
 * - a RunStore (runStore.ts): where runs come from and where outcomes go; the embedded default
 *   is sqliteRunStore, the runs table as the queue. `kick()` claims runs while a thread is free;
 * - WorkerThreads (workerThreads.ts): the threads, kept alive while work is queued;
 * - ActiveRun (activeRun.ts): one run's parts when it is split over idle threads by period
 *   range (splitRun.ts) and put back together bit for bit; with other runs waiting, each run
 *   takes one thread (throughput first);
 * - RunEvents (runEvents.ts): progress and status for the event streams.
 *
 * A run finishes exactly once: every write after the claim names the claimed attempt, runs
 * left running by a crash are queued again at `start()`, and a run that fails (worker error,
 * exit, time limit, in any of its parts) gets its credit back in the same transaction; the
 * threads of its other parts are ended.
 */
export class RunQueue {
  readonly workerCount: number
  private readonly store: RunStore
  private readonly pool: WorkerThreads<Part>
  private readonly events = new RunEvents()
  private readonly timeLimitMs: number
  private readonly log: (line: string) => void
  private stopped = false
  private kicking = false
  private kickAgain = false

  constructor(options: RunQueueOptions) {
    this.store = options.store ?? sqliteRunStore(options.db)
    this.workerCount = options.workerCount ?? availableParallelism()
    this.timeLimitMs = options.runTimeLimitS * 1000
    this.log = options.log ?? (() => {})
    const workerFile = options.workerFile ?? defaultWorkerFile()
    // Fail at boot, not on every run, when the build is incomplete.
    if (!existsSync(workerFile)) {
      throw new Error(`The run worker ${fileURLToPath(workerFile)} is missing: run \`npm run build\` first.`)
    }
    this.pool = new WorkerThreads<Part>({
      size: this.workerCount,
      file: fileURLToPath(workerFile),
      idleMs: options.idleMs ?? 10_000,
      begin: (thread, part) => this.begin(thread, part),
      message: (thread, message) => this.onMessage(thread, message),
      lost: (part, why) => this.endRun(part.run, why),
      freed: () => this.kick(),
    })
  }

  /** Queues again the runs a previous process left running, then starts work. */
  start(): void {
    const { requeued, failed } = this.store.recover()
    if (requeued || failed)
      this.log(`Run queue: ${requeued} interrupted run(s) queued again, ${failed} failed.`)
    this.kick()
  }

  /** Claims queued runs while a thread is free. Call after a run is created. */
  kick(): void {
    if (this.stopped) return
    if (this.kicking) {
      this.kickAgain = true
      return
    }
    this.kicking = true
    try {
      do {
        this.kickAgain = false
        this.claimWhileFree()
      } while (this.kickAgain && !this.stopped)
    } finally {
      this.kicking = false
    }
  }

  private claimWhileFree(): void {
    for (let free = this.pool.free; free > 0; free = this.pool.free) {
      const claimed = this.store.claim()
      if (!claimed) return
      const run = this.prepare(claimed, free > 1 && !this.store.hasWaiting() ? free : 1)
      if (run) for (const part of run.parts) this.pool.run(part)
    }
  }

  /** Loads a claimed run's samples and splits it into up to `threads` parts; a run whose input cannot be loaded fails at once. */
  private prepare(claimed: ClaimedRun, threads: number): ActiveRun | undefined {
    try {
      return new ActiveRun(claimed, this.store.load(claimed), threads)
    } catch (err) {
      this.finishFailed(claimed, err instanceof Error ? err.message : String(err))
      return undefined
    }
  }

  /** A part reached a thread: post it; the first part to reach one starts the run's clock. */
  private begin(thread: Thread<Part>, part: Part): boolean {
    const run = part.run
    if (this.stopped) {
      this.putBack(run)
      return false
    }
    // A part of a run that ended meanwhile (another part failed): the thread takes other work.
    if (run.ended) return false
    run.timer ??= setTimeout(() => this.endRun(run, this.timeLimitMessage()), this.timeLimitMs)
    if (!run.announced) {
      run.announced = true
      this.events.publish({ type: 'status', runId: run.id, status: 'running', progress: 0, error: null })
    }
    const { request, transfer } = run.request(part)
    thread.worker.postMessage(request, transfer)
    return true
  }

  /** The one consumer of worker replies: progress, the engine's error, or a result. */
  private onMessage(thread: Thread<Part>, message: unknown): void {
    const part = thread.task
    const parsed = workerReplySchema.safeParse(message)
    if (!parsed.success) {
      this.pool.end(thread)
      if (part) this.endRun(part.run, 'The computation sent back a message that could not be read.')
      return
    }
    const reply = parsed.data
    if (!part || part.run.id !== reply.runId) return
    const run = part.run
    switch (reply.type) {
      case 'progress':
        part.progress = reply.progress
        this.publishProgress(run)
        return
      case 'error':
        part.answered = true
        this.endRun(run, `The computation failed: ${reply.message}`)
        return
      case 'result': {
        part.answered = true
        part.result = reply
        const outcome = run.outcome()
        if (outcome === undefined) {
          this.pool.release(thread)
          this.publishProgress(run)
        } else if (outcome === 'again') {
          this.log(`Run ${run.id}: computed again in one piece (its parts' warnings do not merge).`)
          this.pool.give(thread, run.parts[0]!)
        } else {
          this.endRun(run, outcome)
        }
        return
      }
    }
  }

  private publishProgress(run: ActiveRun): void {
    const progress = run.advance()
    if (progress === undefined) return
    this.store.progress(run.claimed, progress)
    this.events.publish({ type: 'progress', runId: run.id, progress })
  }

  /**
   * Ends a run once: stores the result, or fails it with a message (credit returned). Threads
   * still computing other parts of it are ended; the others take their next runs first, so they
   * compute while this run's result is stored.
   */
  private endRun(run: ActiveRun, outcome: string | WorkerResult): void {
    if (run.ended) return
    this.release(run)
    this.kick()
    if (typeof outcome === 'string') this.finishFailed(run.claimed, outcome)
    else this.finishSucceeded(run, outcome)
  }

  /** Marks a run ended and frees its threads, ending those still computing a part of it. */
  private release(run: ActiveRun): void {
    run.ended = true
    clearTimeout(run.timer)
    for (const thread of this.pool.holding((part) => part.run === run)) {
      if (thread.task?.answered) this.pool.release(thread)
      else this.pool.end(thread)
    }
  }

  private finishSucceeded(run: ActiveRun, result: WorkerResult): void {
    const { claimed } = run
    try {
      const ok = this.store.succeed(claimed, result, {
        queuedMs: claimed.startedAt - claimed.createdAt,
        computeMs: result.computeMs,
        runMs: Date.now() - claimed.startedAt,
        parts: run.parts.length,
      })
      if (ok)
        this.events.publish({
          type: 'status',
          runId: claimed.id,
          status: 'succeeded',
          progress: 1,
          error: null,
        })
    } catch (err) {
      this.log(
        `Run ${claimed.id}: storing the result failed: ${err instanceof Error ? err.stack : String(err)}`,
      )
      this.finishFailed(claimed, 'The result could not be stored.')
    }
  }

  private finishFailed(claimed: ClaimedRun, message: string): void {
    if (this.store.fail(claimed, message))
      this.events.publish({
        type: 'status',
        runId: claimed.id,
        status: 'failed',
        progress: 0,
        error: message,
      })
  }

  private timeLimitMessage(): string {
    return `The run took longer than the limit of ${this.timeLimitMs / 1000} s and was stopped.`
  }

  /** Puts a run that has not ended back in the queue (shutdown). */
  private putBack(run: ActiveRun): void {
    if (run.ended) return
    run.ended = true
    clearTimeout(run.timer)
    if (this.store.putBack(run.claimed)) this.log(`Run ${run.id} queued again at shutdown.`)
  }

  /**
   * Stops claiming runs, waits up to `graceMs` for the runs in progress, then puts any still
   * running back in the queue (the next start picks them up) and ends every thread.
   */
  async stop(graceMs = 5000): Promise<void> {
    this.stopped = true
    await this.pool.drained(graceMs)
    for (const part of await this.pool.stop()) this.putBack(part.run)
  }

  /** The embedded queue has no Redis; its workers are this process's live threads. */
  health(): Promise<QueueHealth> {
    return Promise.resolve({ queue: 'embedded', redisReachable: null, workers: this.pool.size })
  }

  /** Listens to one run's progress and status; returns the function that stops listening. */
  subscribe(runId: string, listener: (event: RunEvent) => void): () => void {
    return this.events.subscribe(runId, listener)
  }

  /** How many listeners follow a run (event streams unsubscribe when their client goes away). */
  subscriberCount(runId: string): number {
    return this.events.subscriberCount(runId)
  }

  /** Runs being computed now (for tests and diagnostics). */
  activeRunIds(): string[] {
    return [...new Set(this.pool.holding(() => true).map((t) => t.task!.run.id))]
  }

  /** The live worker threads. */
  get threads(): number {
    return this.pool.size
  }

  /** A worker computing (a part of) a run, if any (tests use it to kill a worker mid-run). */
  workerFor(runId: string): Worker | undefined {
    return this.workersFor(runId)[0]
  }

  /** The workers computing the parts of a run (more than one when the run was split). */
  workersFor(runId: string): Worker[] {
    return this.pool.holding((part) => part.run.id === runId).map((t) => t.worker)
  }
}
