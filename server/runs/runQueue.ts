import { EventEmitter } from 'node:events'
import { existsSync } from 'node:fs'
import { availableParallelism } from 'node:os'
import { fileURLToPath } from 'node:url'
import type { Worker } from 'node:worker_threads'
import Pool from 'worker-threads-pool'
import {
  workerReplySchema,
  type WorkerReply,
  type WorkerRequest,
} from '../../shared/schemas/spectrumWorker.js'
import type { RunStatus } from '../../shared/schemas/runs.js'
import type { Db } from '../db/client.js'
import { isCompiled } from '../projectRoot.js'
import {
  claimNextRun,
  completeRun,
  failRun,
  loadRunJob,
  recordRunProgress,
  requeueInterruptedRuns,
  requeueRun,
  type ClaimedRun,
  type RunJob,
} from '../services/runs.js'
import { storedSpectrum } from './storedSpectrum.js'

/** What the event stream of a run carries. */
export type RunEvent =
  | { type: 'progress'; runId: string; progress: number }
  | { type: 'status'; runId: string; status: RunStatus; progress: number; error: string | null }

export interface RunQueueOptions {
  db: Db
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

type WorkerResult = Extract<WorkerReply, { type: 'result' | 'pair-result' }>

interface ActiveRun {
  claimed: ClaimedRun
  timer: NodeJS.Timeout
}

interface Slot {
  worker: Worker
  run?: ActiveRun
  idleTimer?: NodeJS.Timeout
  closing: boolean
  lastError?: string
}

/**
 * Runs queued runs on worker threads. The runs table is the queue: `kick()` claims the oldest
 * queued runs while a thread is free. worker-threads-pool starts a new thread for every
 * acquire (STACK.md), so each acquired worker is kept and handed the next run by message, and
 * is let go only after `idleMs` without work. Progress and status changes are written to the
 * runs table and published to subscribers (the server-sent event streams).
 *
 * A run finishes exactly once: every write after the claim is guarded by the run's attempt
 * number, runs left `running` by a crash are queued again at `start()`, and a run that fails
 * (worker error, exit, time limit) gets its credit back in the same transaction.
 * Two-component runs slot in through `loadRunJob` (a `pair` job with two sample buffers) and
 * the worker's message schema; the queue itself does not look inside a job.
 */
export class RunQueue {
  readonly workerCount: number
  private readonly db: Db
  private readonly pool: Pool
  private readonly slots = new Set<Slot>()
  private readonly events = new EventEmitter()
  private readonly idleMs: number
  private readonly timeLimitMs: number
  private readonly workerFile: URL
  private readonly log: (line: string) => void
  private starting = 0
  private stopped = false
  private kicking = false
  private kickAgain = false
  private readonly settledListeners = new Set<() => void>()

  constructor(options: RunQueueOptions) {
    this.db = options.db
    this.workerCount = options.workerCount ?? availableParallelism()
    this.timeLimitMs = options.runTimeLimitS * 1000
    this.idleMs = options.idleMs ?? 10_000
    this.workerFile = options.workerFile ?? defaultWorkerFile()
    // Fail at boot, not on every run, when the build is incomplete.
    if (!existsSync(this.workerFile)) {
      throw new Error(
        `The run worker ${fileURLToPath(this.workerFile)} is missing: run \`npm run build\` first.`,
      )
    }
    this.log = options.log ?? (() => {})
    this.pool = new Pool({ max: this.workerCount })
    this.events.setMaxListeners(0)
  }

  /** Queues again the runs a previous process left running, then starts work. */
  start(): void {
    const { requeued, failed } = requeueInterruptedRuns(this.db)
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
        this.fillSlots()
      } while (this.kickAgain && !this.stopped)
    } finally {
      this.kicking = false
    }
    for (const slot of this.slots) if (!slot.run && !slot.closing && !slot.idleTimer) this.armIdleTimer(slot)
  }

  private fillSlots(): void {
    for (const slot of this.slots) {
      while (!slot.run && !slot.closing) {
        const claimed = claimNextRun(this.db)
        if (!claimed) return
        this.assign(slot, claimed)
      }
    }
    while (this.slots.size + this.starting < this.workerCount) {
      const claimed = claimNextRun(this.db)
      if (!claimed) return
      this.starting++
      this.pool.acquire(fileURLToPath(this.workerFile), (err, worker) => {
        this.starting--
        if (err) {
          this.finishFailed(claimed, `The computation could not start: ${err.message}`)
          this.settled()
          return
        }
        const slot = this.addSlot(worker)
        if (this.stopped) {
          requeueRun(this.db, claimed)
          this.close(slot)
          this.settled()
          return
        }
        this.assign(slot, claimed)
        this.kick()
      })
    }
  }

  /** Listens to one run's progress and status; returns the function that stops listening. */
  subscribe(runId: string, listener: (event: RunEvent) => void): () => void {
    const name = `run:${runId}`
    this.events.on(name, listener)
    return () => this.events.off(name, listener)
  }

  /** How many listeners follow a run (event streams unsubscribe when their client goes away). */
  subscriberCount(runId: string): number {
    return this.events.listenerCount(`run:${runId}`)
  }

  /** Runs being computed now (for tests and diagnostics). */
  activeRunIds(): string[] {
    return [...this.slots].flatMap((s) => (s.run ? [s.run.claimed.id] : []))
  }

  /** The live worker threads. */
  get threads(): number {
    return this.slots.size
  }

  /** The worker computing a run, if any (tests use it to kill a worker mid-run). */
  workerFor(runId: string): Worker | undefined {
    for (const slot of this.slots) if (slot.run?.claimed.id === runId) return slot.worker
    return undefined
  }

  /**
   * Stops claiming runs, waits up to `graceMs` for the runs in progress, then puts any still
   * running back in the queue (the next start picks them up) and ends every thread.
   */
  async stop(graceMs = 5000): Promise<void> {
    this.stopped = true
    const busy = () => [...this.slots].some((s) => s.run) || this.starting > 0
    if (busy()) {
      await new Promise<void>((resolve) => {
        const timer = setTimeout(done, graceMs)
        const check = () => {
          if (!busy()) done()
        }
        function done() {
          clearTimeout(timer)
          resolve()
        }
        this.settledListeners.add(check)
      })
      this.settledListeners.clear()
    }
    const exits: Promise<unknown>[] = []
    for (const slot of this.slots) {
      if (slot.run) {
        clearTimeout(slot.run.timer)
        if (requeueRun(this.db, slot.run.claimed))
          this.log(`Run ${slot.run.claimed.id} queued again at shutdown.`)
        slot.run = undefined
      }
      slot.closing = true
      clearTimeout(slot.idleTimer)
      exits.push(slot.worker.terminate())
    }
    await Promise.allSettled(exits)
    this.slots.clear()
  }

  private addSlot(worker: Worker): Slot {
    const slot: Slot = { worker, closing: false }
    this.slots.add(slot)
    worker.on('message', (message: unknown) => this.onMessage(slot, message))
    worker.on('error', (err) => {
      slot.lastError = err.message
    })
    worker.on('exit', (code) => this.onExit(slot, code))
    return slot
  }

  /** Sends a claimed run to an idle worker; a run whose input cannot be loaded fails at once. */
  private assign(slot: Slot, claimed: ClaimedRun): void {
    clearTimeout(slot.idleTimer)
    slot.idleTimer = undefined
    let input: RunJob
    try {
      input = loadRunJob(this.db, claimed)
    } catch (err) {
      this.finishFailed(claimed, err instanceof Error ? err.message : String(err))
      return
    }
    slot.run = { claimed, timer: setTimeout(() => this.onTimeLimit(slot), this.timeLimitMs) }
    this.publish({ type: 'status', runId: claimed.id, status: 'running', progress: 0, error: null })
    const request: WorkerRequest = {
      type: 'run',
      runId: claimed.id,
      job: input.job,
      settings: {
        method: claimed.settings.method,
        dampingRatios: claimed.settings.dampingRatios,
        periodsS: claimed.settings.periodsS,
        ...(claimed.settings.combinations ? { combinations: claimed.settings.combinations } : {}),
      },
    }
    slot.worker.postMessage(request, input.transfer)
  }

  private onMessage(slot: Slot, message: unknown): void {
    const parsed = workerReplySchema.safeParse(message)
    if (!parsed.success) {
      this.close(slot)
      this.endActive(slot, 'The computation sent back a message that could not be read.')
      return
    }
    const reply = parsed.data
    const active = slot.run
    if (!active || active.claimed.id !== reply.runId) return
    switch (reply.type) {
      case 'progress':
        recordRunProgress(this.db, active.claimed, reply.progress)
        this.publish({ type: 'progress', runId: reply.runId, progress: reply.progress })
        return
      case 'error':
        this.endActive(slot, `The computation failed: ${reply.message}`)
        return
      case 'result':
      case 'pair-result':
        this.endActive(slot, reply)
        return
    }
  }

  /** Ends the slot's run: stores the result, or fails the run with a message (credit returned). */
  private endActive(slot: Slot, outcome: string | WorkerResult): void {
    const active = slot.run
    if (!active) return
    clearTimeout(active.timer)
    slot.run = undefined
    // Hand the thread its next run first, so it computes while this run's result is stored.
    this.kick()
    const claimed = active.claimed
    if (typeof outcome === 'string') this.finishFailed(claimed, outcome)
    else this.finishSucceeded(claimed, outcome)
    this.settled()
  }

  private finishSucceeded(claimed: ClaimedRun, reply: WorkerResult): void {
    try {
      const finishedAt = Date.now()
      const ok = completeRun(this.db, claimed, {
        result: storedSpectrum(this.db, claimed, reply),
        engineVersion: reply.computation.methodStatement.engineVersion,
        timings: {
          queuedMs: claimed.startedAt - claimed.createdAt,
          computeMs: reply.computeMs,
          runMs: finishedAt - claimed.startedAt,
        },
      })
      if (ok)
        this.publish({ type: 'status', runId: claimed.id, status: 'succeeded', progress: 1, error: null })
    } catch (err) {
      this.log(
        `Run ${claimed.id}: storing the result failed: ${err instanceof Error ? err.stack : String(err)}`,
      )
      this.finishFailed(claimed, 'The result could not be stored.')
    }
  }

  private finishFailed(claimed: ClaimedRun, message: string): void {
    if (failRun(this.db, claimed, message)) {
      this.publish({ type: 'status', runId: claimed.id, status: 'failed', progress: 0, error: message })
    }
  }

  private armIdleTimer(slot: Slot): void {
    slot.idleTimer = setTimeout(() => {
      if (!slot.run) this.close(slot)
    }, this.idleMs)
    slot.idleTimer.unref()
  }

  /** Ends a thread; its exit handler removes the slot. */
  private close(slot: Slot): void {
    slot.closing = true
    clearTimeout(slot.idleTimer)
    void slot.worker.terminate()
  }

  private onTimeLimit(slot: Slot): void {
    this.close(slot)
    this.endActive(
      slot,
      `The run took longer than the limit of ${this.timeLimitMs / 1000} s and was stopped.`,
    )
  }

  private onExit(slot: Slot, code: number): void {
    clearTimeout(slot.idleTimer)
    this.slots.delete(slot)
    const why = slot.lastError ? `: ${slot.lastError}` : ` (exit code ${code})`
    this.endActive(slot, `The computation stopped unexpectedly${why}.`)
    this.kick()
  }

  private settled(): void {
    for (const listener of this.settledListeners) listener()
  }

  private publish(event: RunEvent): void {
    this.events.emit(`run:${event.runId}`, event)
  }
}
