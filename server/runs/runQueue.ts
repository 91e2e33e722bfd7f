import { EventEmitter } from 'node:events'
import { existsSync } from 'node:fs'
import { availableParallelism } from 'node:os'
import { fileURLToPath } from 'node:url'
import type { Worker } from 'node:worker_threads'
import Pool from 'worker-threads-pool'
import {
  workerReplySchema,
  type SpectrumJob,
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
  hasQueuedRuns,
  loadRunJob,
  recordRunProgress,
  requeueInterruptedRuns,
  requeueRun,
  type ClaimedRun,
  type RunJob,
} from '../services/runs.js'
import { mergeRunParts, planRunParts } from './splitRun.js'
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
type RecordResult = Extract<WorkerReply, { type: 'result' }>

/** A claimed run being computed, in one part or in several parts side by side. */
interface ActiveRun {
  claimed: ClaimedRun
  /** The run's samples, kept so a part (or the whole run again) can be sent a copy. */
  job: SpectrumJob
  parts: Part[]
  /** Started when the first part reaches a thread. */
  timer?: NodeJS.Timeout
  /** Whether the 'running' status was published (once the first part reaches a thread). */
  announced: boolean
  /** Highest progress published, so events never go backwards. */
  progress: number
  ended: boolean
}

/** One part of a run: its periods, its share of the work, the thread computing it and its answer. */
interface Part {
  run: ActiveRun
  periodsS: number[]
  weight: number
  progress: number
  slot?: Slot
  /** The worker answered (a result or an error). */
  answered: boolean
  reply?: WorkerResult
}

interface Slot {
  worker: Worker
  part?: Part
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
 * When a run is claimed with threads free and nothing else waiting, a large single-record run
 * is split into contiguous period ranges computed on several threads at once (splitRun.ts);
 * the parts' results are put back together into exactly the whole run's result. With other runs
 * waiting, each run takes one thread (throughput first).
 *
 * A run finishes exactly once: every write after the claim is guarded by the run's attempt
 * number, runs left `running` by a crash are queued again at `start()`, and a run that fails
 * (worker error, exit, time limit, in any of its parts) gets its credit back in the same
 * transaction; its other parts' threads are ended.
 * Two-component runs slot in through `loadRunJob` (a `pair` job with two sample buffers) and
 * the worker's message schema; they are never split.
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
    for (const slot of this.slots) if (!slot.part && !slot.closing && !slot.idleTimer) this.armIdleTimer(slot)
  }

  private idleSlots(): Slot[] {
    return [...this.slots].filter((slot) => !slot.part && !slot.closing)
  }

  private fillSlots(): void {
    for (;;) {
      const idle = this.idleSlots()
      const free = idle.length + this.workerCount - this.slots.size - this.starting
      if (free <= 0) return
      const claimed = claimNextRun(this.db)
      if (!claimed) return
      const run = this.prepare(claimed, free > 1 && !hasQueuedRuns(this.db) ? free : 1)
      if (run) for (const part of run.parts) this.dispatch(part, idle.shift())
    }
  }

  /** Loads a claimed run's samples and splits it into up to `threads` parts; a run whose input cannot be loaded fails at once. */
  private prepare(claimed: ClaimedRun, threads: number): ActiveRun | undefined {
    let input: RunJob
    try {
      input = loadRunJob(this.db, claimed)
    } catch (err) {
      this.finishFailed(claimed, err instanceof Error ? err.message : String(err))
      return undefined
    }
    const run: ActiveRun = { claimed, job: input.job, parts: [], announced: false, progress: 0, ended: false }
    run.parts = planRunParts(input.job, claimed.settings, threads).map((part) => ({
      run,
      ...part,
      progress: 0,
      answered: false,
    }))
    return run
  }

  /** Sends a part to an idle thread, or starts a thread for it. */
  private dispatch(part: Part, slot: Slot | undefined): void {
    if (slot) {
      this.send(slot, part)
      return
    }
    this.starting++
    this.pool.acquire(fileURLToPath(this.workerFile), (err, worker) => {
      this.starting--
      if (err) {
        this.endRun(part.run, `The computation could not start: ${err.message}`)
        this.settled()
        return
      }
      const slot = this.addSlot(worker)
      if (this.stopped) {
        this.putBack(part.run)
        this.close(slot)
        this.settled()
        return
      }
      // A part of a run that ended meanwhile (another part failed): the thread takes other work.
      if (!part.run.ended) this.send(slot, part)
      this.kick()
    })
  }

  /** Posts a part to a thread; the first part to reach a thread starts the run's clock. */
  private send(slot: Slot, part: Part): void {
    clearTimeout(slot.idleTimer)
    slot.idleTimer = undefined
    slot.part = part
    part.slot = slot
    const run = part.run
    const { claimed, job } = run
    run.timer ??= setTimeout(() => this.onTimeLimit(run), this.timeLimitMs)
    if (!run.announced) {
      run.announced = true
      this.publish({ type: 'status', runId: claimed.id, status: 'running', progress: 0, error: null })
    }
    // A lone part takes the samples themselves; the parts of a split run each take a copy, and
    // the run keeps its own in case it has to be computed in one piece after all.
    const copy: SpectrumJob =
      run.parts.length === 1 || job.kind !== 'record' ? job : { ...job, samples: job.samples.slice(0) }
    const request: WorkerRequest = {
      type: 'run',
      runId: claimed.id,
      job: copy,
      settings: {
        method: claimed.settings.method,
        dampingRatios: claimed.settings.dampingRatios,
        periodsS: part.periodsS,
        ...(claimed.settings.combinations ? { combinations: claimed.settings.combinations } : {}),
      },
    }
    const transfer = copy.kind === 'record' ? [copy.samples] : [copy.samples1, copy.samples2]
    slot.worker.postMessage(request, transfer)
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
    return [...new Set([...this.slots].flatMap((s) => (s.part ? [s.part.run.claimed.id] : [])))]
  }

  /** The live worker threads. */
  get threads(): number {
    return this.slots.size
  }

  /** A worker computing (a part of) a run, if any (tests use it to kill a worker mid-run). */
  workerFor(runId: string): Worker | undefined {
    for (const slot of this.slots) if (slot.part?.run.claimed.id === runId) return slot.worker
    return undefined
  }

  /** The workers computing the parts of a run (more than one when the run was split). */
  workersFor(runId: string): Worker[] {
    return [...this.slots].flatMap((s) => (s.part?.run.claimed.id === runId ? [s.worker] : []))
  }

  /**
   * Stops claiming runs, waits up to `graceMs` for the runs in progress, then puts any still
   * running back in the queue (the next start picks them up) and ends every thread.
   */
  async stop(graceMs = 5000): Promise<void> {
    this.stopped = true
    const busy = () => [...this.slots].some((s) => s.part) || this.starting > 0
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
      if (slot.part) this.putBack(slot.part.run)
      slot.part = undefined
      slot.closing = true
      clearTimeout(slot.idleTimer)
      exits.push(slot.worker.terminate())
    }
    await Promise.allSettled(exits)
    this.slots.clear()
  }

  /** Puts a run that has not ended back in the queue (shutdown). */
  private putBack(run: ActiveRun): void {
    if (run.ended) return
    this.release(run)
    if (requeueRun(this.db, run.claimed)) this.log(`Run ${run.claimed.id} queued again at shutdown.`)
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

  private onMessage(slot: Slot, message: unknown): void {
    const parsed = workerReplySchema.safeParse(message)
    if (!parsed.success) {
      this.close(slot)
      if (slot.part) this.endRun(slot.part.run, 'The computation sent back a message that could not be read.')
      return
    }
    const reply = parsed.data
    const part = slot.part
    if (!part || part.run.claimed.id !== reply.runId) return
    const run = part.run
    switch (reply.type) {
      case 'progress':
        part.progress = reply.progress
        this.onProgress(run)
        return
      case 'error':
        part.answered = true
        this.endRun(run, `The computation failed: ${reply.message}`)
        return
      case 'result':
      case 'pair-result':
        part.answered = true
        part.reply = reply
        slot.part = undefined
        part.slot = undefined
        this.onPartDone(run, slot)
        return
    }
  }

  /** Publishes the run's progress: the parts' progress weighted by their planned work. */
  private onProgress(run: ActiveRun): void {
    const progress = run.parts.reduce((sum, p) => sum + p.weight * (p.answered ? 1 : p.progress), 0)
    if (!(progress > run.progress) || progress >= 1) return
    run.progress = progress
    recordRunProgress(this.db, run.claimed, progress)
    this.publish({ type: 'progress', runId: run.claimed.id, progress })
  }

  /** A part answered with its result: the run ends when all have, else the thread takes other work. */
  private onPartDone(run: ActiveRun, freed: Slot): void {
    if (!run.parts.every((p) => p.reply)) {
      this.onProgress(run)
      this.kick()
      return
    }
    const [first] = run.parts
    if (run.parts.length === 1 && first?.reply) {
      this.endRun(run, first.reply)
      return
    }
    const merged = mergeRunParts(
      run.parts.map((p) => p.reply).filter((r): r is RecordResult => r?.type === 'result'),
    )
    if (merged) {
      this.endRun(run, merged)
      return
    }
    // The parts' warnings cannot be put together exactly: compute the run in one piece.
    this.log(`Run ${run.claimed.id}: computed again in one piece (its parts' warnings do not merge).`)
    const whole: Part = {
      run,
      periodsS: run.claimed.settings.periodsS,
      weight: 1,
      progress: 0,
      answered: false,
    }
    run.parts = [whole]
    this.send(freed, whole)
  }

  /**
   * Ends a run once: stores the result, or fails it with a message (credit returned). Threads
   * still computing other parts of it are ended; the others take their next runs.
   */
  private endRun(run: ActiveRun, outcome: string | WorkerResult): void {
    if (run.ended) return
    this.release(run)
    // Hand the threads their next runs first, so they compute while this run's result is stored.
    this.kick()
    if (typeof outcome === 'string') this.finishFailed(run.claimed, outcome)
    else this.finishSucceeded(run.claimed, outcome)
    this.settled()
  }

  /** Marks a run ended and frees its threads, ending those still computing a part of it. */
  private release(run: ActiveRun): void {
    run.ended = true
    clearTimeout(run.timer)
    for (const part of run.parts) {
      const slot = part.slot
      if (!slot) continue
      part.slot = undefined
      if (slot.part === part) slot.part = undefined
      if (!part.answered) this.close(slot)
    }
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
      if (!slot.part) this.close(slot)
    }, this.idleMs)
    slot.idleTimer.unref()
  }

  /** Ends a thread; its exit handler removes the slot. */
  private close(slot: Slot): void {
    slot.closing = true
    clearTimeout(slot.idleTimer)
    void slot.worker.terminate()
  }

  private onTimeLimit(run: ActiveRun): void {
    this.endRun(run, `The run took longer than the limit of ${this.timeLimitMs / 1000} s and was stopped.`)
  }

  private onExit(slot: Slot, code: number): void {
    clearTimeout(slot.idleTimer)
    this.slots.delete(slot)
    const why = slot.lastError ? `: ${slot.lastError}` : ` (exit code ${code})`
    if (slot.part) this.endRun(slot.part.run, `The computation stopped unexpectedly${why}.`)
    this.kick()
  }

  private settled(): void {
    for (const listener of this.settledListeners) listener()
  }

  private publish(event: RunEvent): void {
    this.events.emit(`run:${event.runId}`, event)
  }
}
