import { availableParallelism } from 'node:os'
import type { Config } from '../config.js'
import type { Db } from '../db/client.js'
import { RedisRunQueue } from './redisRunQueue.js'
import type { RunEvent } from './runEvents.js'
import { RunQueue } from './runQueue.js'
import { sqliteRunStore } from './sqliteRunStore.js'

/** What GET /api/health says of the run queue. */
export interface QueueHealth {
  queue: 'embedded' | 'redis'
  /** Whether Redis answers; null for the embedded queue, which has none. */
  redisReachable: boolean | null
  /** Compute workers connected now: BullMQ's workers on Redis, or the live threads of this process. */
  workers: number
}

/** What the routes and the server need of a run queue, embedded or on Redis. */
export interface RunScheduler {
  /** Threads computing in this process. */
  readonly workerCount: number
  start(): void
  /** Call after runs are created. */
  kick(): void
  subscribe(runId: string, listener: (event: RunEvent) => void): () => void
  health(): Promise<QueueHealth>
  stop(graceMs?: number): Promise<void>
}

/**
 * The embedded queue (the runs table, this process's threads) unless REDIS_URL is set; then
 * BullMQ on that Redis, with this process computing on WORKER_THREADS threads as well (0: none).
 */
export function createRunScheduler(config: Config, db: Db, log: (line: string) => void): RunScheduler {
  if (config.redisUrl)
    return new RedisRunQueue({
      store: sqliteRunStore(db),
      redisUrl: config.redisUrl,
      runTimeLimitS: config.runTimeLimitS,
      localThreads: config.workerThreads ?? availableParallelism(),
      lockMs: config.queueLockMs,
      stalledMs: config.queueStalledMs,
      log,
    })
  return new RunQueue({ db, workerCount: config.workerThreads, runTimeLimitS: config.runTimeLimitS, log })
}
