import { fileURLToPath } from 'node:url'
import {
  workerReplySchema,
  type WorkerReply,
  type WorkerRequest,
} from '../../shared/schemas/spectrumWorker.js'
import { defaultWorkerFile } from './runQueue.js'
import { type Thread, WorkerThreads } from './workerThreads.js'

/** What a computation ends with: the engine's result, or its error message. */
export type ThreadReply = Exclude<WorkerReply, { type: 'progress' }>

/** The thread computing a request stopped (crashed, or was ended) before it answered. */
export class ThreadLostError extends Error {
  override name = 'ThreadLostError'
}

interface Task {
  request: WorkerRequest
  transfer: ArrayBuffer[]
  onProgress: (progress: number) => void
  timeLimitMs?: number
  timer?: NodeJS.Timeout
  resolve: (reply: ThreadReply) => void
  reject: (err: Error) => void
}

/**
 * Spectrum computations as promises, for a compute node: each request goes to one of at most
 * `size` kept-alive worker threads (WorkerThreads), and requests beyond that wait their turn,
 * oldest first. The embedded RunQueue drives WorkerThreads itself, because it splits runs over
 * threads; a compute node takes whole jobs and only needs this.
 */
export class SpectrumThreads {
  private readonly threads: WorkerThreads<Task>
  private readonly waiting: Task[] = []
  private closed = false

  constructor(options: { size: number; idleMs?: number; workerFile?: URL }) {
    if (!Number.isInteger(options.size) || options.size < 1)
      throw new RangeError('size must be a whole number ≥ 1')
    this.threads = new WorkerThreads<Task>({
      size: options.size,
      file: fileURLToPath(options.workerFile ?? defaultWorkerFile()),
      idleMs: options.idleMs ?? 10_000,
      begin: (thread, task) => this.begin(thread, task),
      message: (thread, message) => this.onMessage(thread, message),
      lost: (task, why) => {
        clearTimeout(task.timer)
        task.reject(new ThreadLostError(why))
      },
      freed: () => this.pump(),
    })
  }

  /**
   * Computes one request. Resolves with the engine's answer (a result, or an error the engine
   * reported); a request still computing after `timeLimitMs` has its thread ended and resolves
   * as an error. Rejects with ThreadLostError when the thread stops before answering.
   */
  compute(
    request: WorkerRequest,
    transfer: ArrayBuffer[],
    options: { onProgress?: (progress: number) => void; timeLimitMs?: number } = {},
  ): Promise<ThreadReply> {
    if (this.closed) return Promise.reject(new ThreadLostError('The compute threads are closed.'))
    return new Promise((resolve, reject) => {
      const { onProgress = () => {}, timeLimitMs } = options
      this.waiting.push({ request, transfer, onProgress, timeLimitMs, resolve, reject })
      this.pump()
    })
  }

  /** Ends every thread; requests computing or waiting reject with ThreadLostError. */
  async close(): Promise<void> {
    this.closed = true
    const dropped = [...this.waiting.splice(0), ...(await this.threads.stop())]
    for (const task of dropped) {
      clearTimeout(task.timer)
      task.reject(new ThreadLostError('The compute threads were closed.'))
    }
  }

  private pump(): void {
    while (!this.closed && this.waiting.length > 0 && this.threads.free > 0) {
      const task = this.waiting.shift()
      if (task) this.threads.run(task)
    }
  }

  private begin(thread: Thread<Task>, task: Task): boolean {
    if (task.timeLimitMs !== undefined) {
      task.timer = setTimeout(() => {
        this.threads.end(thread)
        task.resolve({
          type: 'error',
          runId: task.request.runId,
          message: `The run took longer than the limit of ${(task.timeLimitMs ?? 0) / 1000} s and was stopped.`,
        })
      }, task.timeLimitMs)
    }
    thread.worker.postMessage(task.request, task.transfer)
    return true
  }

  private onMessage(thread: Thread<Task>, message: unknown): void {
    const task = thread.task
    if (!task) return
    const parsed = workerReplySchema.safeParse(message)
    if (!parsed.success) {
      clearTimeout(task.timer)
      this.threads.end(thread)
      task.reject(new ThreadLostError('The computation sent back a message that could not be read.'))
      return
    }
    const reply = parsed.data
    if (reply.runId !== task.request.runId) return
    if (reply.type === 'progress') {
      task.onProgress(reply.progress)
      return
    }
    clearTimeout(task.timer)
    this.threads.release(thread)
    task.resolve(reply)
  }
}
