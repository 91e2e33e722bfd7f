import { z } from 'zod'

/**
 * What travels through the BullMQ queue between the web process and the compute nodes. Shared
 * by both sides, so a job written by one is read by the other with the same rules.
 */

/** The one queue every web process and compute node of an installation uses. */
export const RUN_QUEUE_NAME = 'ordinate-runs'

/**
 * A job's id: the run and its attempt. BullMQ ignores a second job with an id it still holds,
 * so an attempt is enqueued at most once; the run row in SQLite, not the queue, decides whether
 * a run still needs work (server/runs/redisRunQueue.ts). BullMQ refuses ':' in custom ids.
 */
export function runJobId(run: { id: string; attempt: number }): string {
  return `${run.id}-a${run.attempt}`
}

export function parseRunJobId(jobId: string | undefined): { runId: string; attempt: number } | undefined {
  const match = /^(.+)-a(\d+)$/.exec(jobId ?? '')
  if (!match?.[1] || !match[2]) return undefined
  return { runId: match[1], attempt: Number(match[2]) }
}

/** A job's data: the worker request (samples included, see queueCodec.ts) and the run's time limit. */
export const runJobDataSchema = z.object({
  runId: z.string(),
  attempt: z.number().int().positive(),
  timeLimitMs: z.number().positive(),
  /** A WorkerRequest through encodeForQueue; the worker thread validates it as it always does. */
  request: z.unknown(),
})
export type RunJobData = z.infer<typeof runJobDataSchema>
