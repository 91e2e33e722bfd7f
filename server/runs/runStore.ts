import type { RunSettings } from '../../shared/schemas/runs.js'
import type { SpectrumJob, WorkerReply } from '../../shared/schemas/spectrumWorker.js'

/** A run taken off the queue, with the attempt number that owns it. */
export interface ClaimedRun {
  id: string
  firmId: string
  recordId: string | null
  pairId: string | null
  settings: RunSettings
  attempt: number
  createdAt: number
  startedAt: number
}

/** A worker's answer with a computed spectrum. */
export type WorkerResult = Extract<WorkerReply, { type: 'result' | 'pair-result' }>

/** How long a run took, in milliseconds, and over how many threads it was computed. */
export interface RunTimings {
  queuedMs: number
  /** The engine inside the worker; for a split run, its longest part. */
  computeMs: number
  runMs: number
  /** 1, or the number of period ranges a split run was computed in side by side. */
  parts: number
}

/**
 * Where the queue's runs come from. `claim` is pull-based: the queue asks whenever a thread is
 * free, and whoever adds work calls `RunQueue.kick()`. Every later write names the claimed
 * attempt, so a run finishes exactly once.
 */
export interface RunSource {
  /** At start: runs a previous process left running go back to the queue (or fail). */
  recover(): { requeued: number; failed: number }
  /** Takes the oldest waiting run and marks it running, or answers undefined. */
  claim(): ClaimedRun | undefined
  /** Whether another run is waiting (the queue splits a run over idle threads only when none is). */
  hasWaiting(): boolean
  /** The samples of a claimed run; throws with a message a person can act on when they are gone. */
  load(run: ClaimedRun): SpectrumJob
  /** Puts a claimed run back in the queue (graceful shutdown); the attempt does not count. */
  putBack(run: ClaimedRun): boolean
}

/** Where the queue's outcomes go. Each answers false when the attempt no longer owns the run. */
export interface RunSink {
  /** A running run's progress, 0–1. */
  progress(run: Pick<ClaimedRun, 'id' | 'attempt'>, fraction: number): void
  /** Stores the spectrum and spends the run's credit. */
  succeed(run: ClaimedRun, reply: WorkerResult, timings: RunTimings): boolean
  /** Fails the run with a message and returns its credit. */
  fail(run: ClaimedRun, message: string): boolean
}

/**
 * What the distributed queue needs besides (server/runs/redisRunQueue.ts): there a claimed run
 * is handed to Redis and computed elsewhere, so it must be found again and retried by the
 * run's own attempt limit when its computation is lost.
 */
export interface HandedOffRuns {
  /** Runs marked running (handed off) and not finished, oldest first. */
  running(): ClaimedRun[]
  /** Queued again with the attempt counting, or failed with its credit returned after the last attempt. */
  retry(run: ClaimedRun, why: string): 'queued' | 'failed' | 'gone'
}

/** Both ends of the queue: the embedded default is sqliteRunStore (the runs table is the queue). */
export type RunStore = RunSource & RunSink & HandedOffRuns
