import type { Worker, WorkerOptions } from 'node:worker_threads'
import Pool from 'worker-threads-pool'

/** One live worker thread and the task it holds, if any. */
export interface Thread<T> {
  readonly worker: Worker
  task?: T
}

export interface WorkerThreadsOptions<T> {
  /** Threads alive at once at most. */
  size: number
  /** The worker entry point (a path, or code with `workerOptions: { eval: true }`). */
  file: string
  workerOptions?: WorkerOptions
  /** A thread with nothing to do exits after this long. */
  idleMs: number
  /** A task reached a thread: post it, and answer true; false leaves the thread free. */
  begin: (thread: Thread<T>, task: T) => boolean
  /** A message from a thread (route it by the thread's task). */
  message: (thread: Thread<T>, message: unknown) => void
  /** A thread that held a task is gone (it exited, crashed or could not start), with the reason. */
  lost: (task: T, why: string) => void
  /** A thread became free or ended: more work may be taken. */
  freed: () => void
}

interface Slot<T> extends Thread<T> {
  idleTimer?: NodeJS.Timeout
  closing: boolean
  lastError?: string
}

/**
 * A fixed number of worker threads kept alive while there is work. worker-threads-pool starts a
 * new thread for every acquire and never reuses one (STACK.md), so a thread is acquired once,
 * handed task after task by message, and let go only after `idleMs` without one. Knows nothing
 * of runs: a task is whatever the owner posts, and messages go back to it with their thread.
 */
export class WorkerThreads<T> {
  private readonly pool: Pool
  private readonly slots = new Set<Slot<T>>()
  private starting = 0
  private stopping = false
  private readonly drainedListeners = new Set<() => void>()

  constructor(private readonly options: WorkerThreadsOptions<T>) {
    this.pool = new Pool({ max: options.size })
  }

  /** The live threads. */
  get size(): number {
    return this.slots.size
  }

  /** Threads that could take a task now: the idle ones and those not started yet. */
  get free(): number {
    return this.idle().length + this.options.size - this.slots.size - this.starting
  }

  /** Whether a thread holds a task or is starting for one. */
  get busy(): boolean {
    return this.starting > 0 || [...this.slots].some((s) => s.task !== undefined)
  }

  /** The threads whose tasks match. */
  holding(match: (task: T) => boolean): Thread<T>[] {
    return [...this.slots].filter((s) => s.task !== undefined && match(s.task))
  }

  /** Gives the task to an idle thread, or starts a thread for it. */
  run(task: T): void {
    const idle = this.idle()[0]
    if (idle) {
      this.begin(idle, task)
      return
    }
    this.starting++
    const { file, workerOptions } = this.options
    const started = (err: Error | null, worker: Worker) => {
      this.starting--
      if (err) {
        this.options.lost(task, `The computation could not start: ${err.message}`)
        this.changed()
        return
      }
      const slot = this.add(worker)
      if (this.stopping || !this.begin(slot, task)) {
        if (this.stopping) this.end(slot)
        this.changed()
      }
    }
    if (workerOptions) this.pool.acquire(file, workerOptions, started)
    else this.pool.acquire(file, started)
  }

  /** Hands a thread that holds a finished task its next one directly. */
  give(thread: Thread<T>, task: T): void {
    this.begin(thread as Slot<T>, task)
  }

  /** The thread's task is done: it waits for the next one. */
  release(thread: Thread<T>): void {
    const slot = thread as Slot<T>
    slot.task = undefined
    this.changed()
  }

  /** Ends a thread; a task it still holds is dropped without `lost`. */
  end(thread: Thread<T>): void {
    const slot = thread as Slot<T>
    slot.task = undefined
    slot.closing = true
    clearTimeout(slot.idleTimer)
    void slot.worker.terminate()
  }

  /** Resolves once no thread holds a task, or after `graceMs`. */
  drained(graceMs: number): Promise<void> {
    if (!this.busy) return Promise.resolve()
    return new Promise((resolve) => {
      const done = () => {
        clearTimeout(timer)
        this.drainedListeners.delete(check)
        resolve()
      }
      const check = () => {
        if (!this.busy) done()
      }
      const timer = setTimeout(done, graceMs)
      this.drainedListeners.add(check)
    })
  }

  /** Ends every thread; answers the tasks they still held, for the owner to put back. */
  async stop(): Promise<T[]> {
    this.stopping = true
    const held: T[] = []
    const exits: Promise<unknown>[] = []
    for (const slot of this.slots) {
      if (slot.task !== undefined) held.push(slot.task)
      slot.task = undefined
      slot.closing = true
      clearTimeout(slot.idleTimer)
      exits.push(slot.worker.terminate())
    }
    await Promise.allSettled(exits)
    this.slots.clear()
    return held
  }

  private idle(): Slot<T>[] {
    return [...this.slots].filter((s) => s.task === undefined && !s.closing)
  }

  private begin(slot: Slot<T>, task: T): boolean {
    clearTimeout(slot.idleTimer)
    slot.idleTimer = undefined
    slot.task = task
    if (this.options.begin(slot, task)) return true
    slot.task = undefined
    return false
  }

  private add(worker: Worker): Slot<T> {
    const slot: Slot<T> = { worker, closing: false }
    this.slots.add(slot)
    worker.on('message', (message: unknown) => this.options.message(slot, message))
    worker.on('error', (err) => {
      slot.lastError = err.message
    })
    worker.on('exit', (code) => {
      clearTimeout(slot.idleTimer)
      this.slots.delete(slot)
      const task = slot.task
      slot.task = undefined
      const why = slot.lastError ? `: ${slot.lastError}` : ` (exit code ${code})`
      if (task !== undefined) this.options.lost(task, `The computation stopped unexpectedly${why}.`)
      this.changed()
    })
    return slot
  }

  /** After any change of who holds what: idle threads get their exit timers, and the owner is told. */
  private changed(): void {
    for (const listener of this.drainedListeners) listener()
    if (this.stopping) return
    this.options.freed()
    for (const slot of this.idle()) {
      if (slot.idleTimer) continue
      slot.idleTimer = setTimeout(() => {
        if (slot.task === undefined) this.end(slot)
      }, this.options.idleMs)
      slot.idleTimer.unref()
    }
  }
}
