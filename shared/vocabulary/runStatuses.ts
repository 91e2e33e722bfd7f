import { z } from 'zod'

/** Where a run stands: queued → running → succeeded or failed. */
export const RUN_STATUSES = ['queued', 'running', 'succeeded', 'failed'] as const
export type RunStatus = (typeof RUN_STATUSES)[number]

export const runStatusSchema = z.enum(RUN_STATUSES)

/** The one wording of each status, for badges, lists and sheets. */
export const RUN_STATUS_LABELS: Readonly<Record<RunStatus, string>> = {
  queued: 'Queued',
  running: 'Running',
  succeeded: 'Done',
  failed: 'Failed',
}

/** A finished run does not change any more: it succeeded (and has a spectrum) or failed. */
export function isFinished(status: RunStatus): boolean {
  return status === 'succeeded' || status === 'failed'
}
