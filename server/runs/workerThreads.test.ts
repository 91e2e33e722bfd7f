import { afterEach, describe, expect, it, vi } from 'vitest'
import { type Thread, WorkerThreads } from './workerThreads.js'

/** A stand-in worker: answers each task with its number after `delayMs`, or exits when asked. */
const ECHO_WORKER = `
  const { parentPort } = require('node:worker_threads')
  parentPort.on('message', (task) => {
    if (task.exitCode !== undefined) process.exit(task.exitCode)
    setTimeout(() => parentPort.postMessage({ done: task.n }), task.delayMs ?? 0)
  })`

interface Task {
  n: number
  delayMs?: number
  exitCode?: number
}

/** Threads running ECHO_WORKER, with what they did recorded. */
function echoThreads(size: number, idleMs = 5000) {
  const done: { n: number; threadId: number }[] = []
  const lost: { task: Task; why: string }[] = []
  const threads: WorkerThreads<Task> = new WorkerThreads<Task>({
    size,
    file: ECHO_WORKER,
    workerOptions: { eval: true },
    idleMs,
    begin: (thread, task) => {
      thread.worker.postMessage(task)
      return true
    },
    message: (thread: Thread<Task>, message) => {
      done.push({ n: (message as { done: number }).done, threadId: thread.worker.threadId })
      threads.release(thread)
    },
    lost: (task, why) => lost.push({ task, why }),
    freed: () => {},
  })
  return { threads, done, lost }
}

let open: WorkerThreads<Task> | undefined
afterEach(async () => {
  await open?.stop()
  open = undefined
})

describe('WorkerThreads', () => {
  it('hands consecutive tasks to the same live thread instead of starting one per task', async () => {
    const { threads, done } = echoThreads(1)
    open = threads
    for (let n = 1; n <= 3; n++) {
      threads.run({ n })
      await vi.waitFor(() => expect(done).toHaveLength(n))
    }
    expect(done.map((d) => d.n)).toEqual([1, 2, 3])
    expect(new Set(done.map((d) => d.threadId)).size).toBe(1)
    expect(threads.size).toBe(1)
  })

  it('starts at most `size` threads, and counts idle and unstarted ones as free', async () => {
    const { threads, done } = echoThreads(2)
    open = threads
    expect(threads.free).toBe(2)
    threads.run({ n: 1, delayMs: 200 })
    expect(threads.free).toBe(1)
    threads.run({ n: 2, delayMs: 200 })
    expect(threads.free).toBe(0)
    expect(threads.busy).toBe(true)
    await vi.waitFor(() => expect(done).toHaveLength(2))
    expect(threads.size).toBe(2)
    expect(threads.free).toBe(2)
    expect(threads.busy).toBe(false)
  })

  it('lets an idle thread exit after the idle period', async () => {
    const { threads, done } = echoThreads(1, 100)
    open = threads
    threads.run({ n: 1 })
    await vi.waitFor(() => expect(done).toHaveLength(1))
    expect(threads.size).toBe(1)
    await vi.waitFor(() => expect(threads.size).toBe(0), { timeout: 5000 })
  })

  it('reports the task of a thread that exits mid-task as lost, with the exit code, and starts a new thread for the next', async () => {
    const { threads, done, lost } = echoThreads(1)
    open = threads
    threads.run({ n: 1, exitCode: 3 })
    await vi.waitFor(() => expect(lost).toHaveLength(1))
    expect(lost[0]).toEqual({
      task: { n: 1, exitCode: 3 },
      why: 'The computation stopped unexpectedly (exit code 3).',
    })
    threads.run({ n: 2 })
    await vi.waitFor(() => expect(done.map((d) => d.n)).toEqual([2]))
  })

  it('drops the task of a thread it ends, without reporting it lost', async () => {
    const { threads, lost } = echoThreads(1)
    open = threads
    threads.run({ n: 1, delayMs: 10_000 })
    await vi.waitFor(() => expect(threads.holding(() => true)).toHaveLength(1))
    const [thread] = threads.holding(() => true)
    const exited = new Promise((resolve) => thread!.worker.once('exit', resolve))
    threads.end(thread!)
    await exited
    expect(threads.size).toBe(0)
    expect(lost).toEqual([])
  })

  it('stops: ends every thread and hands back the tasks they still held', async () => {
    const { threads } = echoThreads(2)
    threads.run({ n: 1, delayMs: 10_000 })
    threads.run({ n: 2, delayMs: 10_000 })
    await vi.waitFor(() => expect(threads.holding(() => true)).toHaveLength(2))
    const held = await threads.stop()
    expect(held.map((t) => t.n).sort()).toEqual([1, 2])
    expect(threads.size).toBe(0)
  })
})
