import {
  type CreateRunBatchInput,
  type CreatedRunBatch,
  type RunBatch,
  type RunBatchProgressEvent,
  type RunBatchStatusEvent,
  type RunBatchSummary,
  createdRunBatchSchema,
  runBatchListSchema,
  runBatchProgressEventSchema,
  runBatchSchema,
  runBatchStatusEventSchema,
} from '../../shared/schemas/runBatches'
import { apiRequest } from './client'

export type {
  CreateRunBatchInput,
  CreatedRunBatch,
  RunBatch,
  RunBatchSummary,
} from '../../shared/schemas/runBatches'

/** `GET /api/run-batches`: the firm's batches, newest first. */
export async function listRunBatches(projectId?: string): Promise<RunBatchSummary[]> {
  return (await apiRequest('/api/run-batches', runBatchListSchema, { query: { projectId } })).items
}

/** `POST /api/run-batches` (202): one run per subject; 402 `no_credits` with `needed` and `balance`. */
export function createRunBatch(body: CreateRunBatchInput): Promise<CreatedRunBatch> {
  return apiRequest('/api/run-batches', createdRunBatchSchema, { method: 'POST', body })
}

/** `GET /api/run-batches/:id`: settings, runs with their states, and counts by state. */
export function getRunBatch(id: string): Promise<RunBatch> {
  return apiRequest(`/api/run-batches/${encodeURIComponent(id)}`, runBatchSchema)
}

export interface RunBatchEventHandlers {
  onProgress: (event: RunBatchProgressEvent) => void
  onStatus: (event: RunBatchStatusEvent) => void
  /** The server closed the stream: every run has finished. */
  onEnd: () => void
}

/**
 * Follows `GET /api/run-batches/:id/events` (server-sent events, each naming its run) until
 * the server closes the stream; returns the function that stops following.
 */
export function followRunBatch(id: string, handlers: RunBatchEventHandlers): () => void {
  const source = new EventSource(`/api/run-batches/${encodeURIComponent(id)}/events`)
  const read = (event: Event): unknown => {
    try {
      return JSON.parse((event as MessageEvent<string>).data) as unknown
    } catch {
      return null
    }
  }
  source.addEventListener('progress', (event) => {
    const parsed = runBatchProgressEventSchema.safeParse(read(event))
    if (parsed.success) handlers.onProgress(parsed.data)
  })
  source.addEventListener('status', (event) => {
    const parsed = runBatchStatusEventSchema.safeParse(read(event))
    if (parsed.success) handlers.onStatus(parsed.data)
  })
  // The server ends the stream once every run has finished; EventSource would reconnect.
  source.addEventListener('error', () => {
    source.close()
    handlers.onEnd()
  })
  return () => source.close()
}
