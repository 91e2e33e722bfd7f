import { Job, Queue, Worker } from 'bullmq'
import { Redis } from 'ioredis'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { encodeForQueue } from '../../server/runs/queueCodec.js'
import { RUN_QUEUE_NAME, runJobId } from '../../server/runs/redisJobs.js'
import { RedisRunQueue } from '../../server/runs/redisRunQueue.js'
import type { ClaimedRun, RunStore, WorkerResult } from '../../server/runs/runStore.js'
import { startRedisServer, type RedisServer } from '../support/redisServer.js'

/**
 * The web process reads a finished job back from Redis in two steps (its state, then the job
 * with its return value). A reconcile that read the job while it was still active, and its
 * state a moment later as completed, once failed a good run in CI with "The computation sent
 * back a result that could not be read" (the snapshot had no return value yet). This drives
 * that interleaving on purpose against a real redis-server: the first read of the job lets the
 * job finish before it answers.
 */

let redis: RedisServer

beforeAll(async () => {
  redis = await startRedisServer()
})

afterAll(async () => {
  await redis?.dispose()
})

const RUN: ClaimedRun = {
  id: 'race-run',
  firmId: 'firm',
  recordId: 'record',
  pairId: null,
  settings: { dampingRatios: [0.05], periodsS: [1], method: 'piecewise-exact' } as ClaimedRun['settings'],
  attempt: 1,
  createdAt: Date.now(),
  startedAt: Date.now(),
}

/** A small reply of the shape the worker threads send (values are placeholders, not a spectrum). */
function reply(): WorkerResult {
  const one = () => Float64Array.of(0.01)
  return {
    type: 'result',
    runId: RUN.id,
    computeMs: 1,
    computation: {
      periodsS: Float64Array.of(1),
      curves: [
        {
          dampingRatio: 0.05,
          sdM: one(),
          svMPerS: one(),
          saMPerS2: one(),
          psvMPerS: one(),
          psaMPerS2: one(),
        },
      ],
      methodStatement: {
        method: 'piecewise-exact',
        solver: 'test',
        newmarkGamma: null,
        newmarkBeta: null,
        recordDtS: 0.01,
        initialConditions: 'at rest',
        subStepRule: 'none',
        subStepsMin: 1,
        subStepsMax: 1,
        freeVibrationTail: 'none',
        accuracyTarget: '0.5%',
        kernel: 'js',
        engineVersion: 'test',
      },
      warnings: [],
      oscillatorSteps: 1,
    },
  } as WorkerResult
}

/** A run store holding one handed-off run; records how it was settled. */
function oneRunStore() {
  const outcome: { succeeded?: WorkerResult; failed?: string } = {}
  const store: RunStore = {
    recover: () => ({ requeued: 0, failed: 0 }),
    claim: () => undefined,
    hasWaiting: () => false,
    load: () => {
      throw new Error('not needed')
    },
    putBack: () => false,
    progress: () => {},
    succeed: (_run, result) => {
      if (outcome.succeeded || outcome.failed) return false
      outcome.succeeded = result
      return true
    },
    fail: (_run, message) => {
      if (outcome.succeeded || outcome.failed) return false
      outcome.failed = message
      return true
    },
    running: () => (outcome.succeeded || outcome.failed ? [] : [RUN]),
    retry: () => 'gone',
  }
  return { store, outcome }
}

describe('collecting a finished job from Redis', () => {
  it('stores the result when the job finishes between the reconcile reading it and reading its state', async () => {
    const connection = new Redis(redis.url, { maxRetriesPerRequest: null })
    const queue = new Queue(RUN_QUEUE_NAME, { connection })
    // A worker that takes the job by hand, so the test decides the moment it finishes.
    const worker = new Worker(RUN_QUEUE_NAME, null, {
      connection: new Redis(redis.url, { maxRetriesPerRequest: null }),
    })
    const token = 'race-test'
    const jobId = runJobId(RUN)
    await queue.add('run', { runId: RUN.id, attempt: 1, timeLimitMs: 60_000, request: {} }, { jobId })
    const active = await worker.getNextJob(token)
    expect(active?.id).toBe(jobId)
    expect(await queue.getJobState(jobId)).toBe('active')
    let finished = false
    const finish = async () => {
      if (finished) return
      finished = true
      await active?.moveToCompleted(encodeForQueue(reply()), token, false)
    }

    // The first read of the job answers what Redis held at that moment, then the job finishes
    // before the caller goes on.
    const realFromId = Job.fromId.bind(Job)
    let raced = false
    const spy = vi.spyOn(Job, 'fromId').mockImplementation(async (...args: Parameters<typeof Job.fromId>) => {
      const snapshot = await realFromId(...args)
      if (!raced) {
        raced = true
        await finish()
      }
      return snapshot
    })

    // Reads of the job's state by the queue under test (not this test's own queue).
    let stateReads = 0
    const realGetJobState = Queue.prototype.getJobState
    const stateSpy = vi.spyOn(Queue.prototype, 'getJobState').mockImplementation(function (
      this: Queue,
      id: string,
    ) {
      if (this !== queue) stateReads += 1
      return realGetJobState.call(this, id)
    })

    const { store, outcome } = oneRunStore()
    const lines: string[] = []
    const runQueue = new RedisRunQueue({
      store,
      redisUrl: redis.url,
      runTimeLimitS: 60,
      localThreads: 0,
      lockMs: 30_000,
      stalledMs: 30_000,
      reconcileMs: 200,
      log: (line) => lines.push(line),
    })
    try {
      runQueue.start()
      // A reconcile (once Redis is ready) meets the job active and reads it. Once it has, the job
      // may finish (if that read did not already let it), and the run is settled by its result.
      await vi.waitFor(() => expect(raced || stateReads > 0).toBe(true), { timeout: 10_000 })
      await runQueue.idle()
      await finish()
      await vi.waitFor(() => expect(outcome.succeeded ?? outcome.failed).toBeDefined(), { timeout: 20_000 })
      expect(outcome.failed, lines.join('\n')).toBeUndefined()
      expect(
        Array.from(outcome.succeeded?.type === 'result' ? outcome.succeeded.computation.periodsS : []),
      ).toEqual([1])
    } finally {
      spy.mockRestore()
      stateSpy.mockRestore()
      await runQueue.stop()
      await worker.close()
      await queue.close()
      connection.disconnect()
    }
  })
})
