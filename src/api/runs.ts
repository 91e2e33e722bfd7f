import {
  type CreatePairRunBody,
  type CreateRunBody,
  type Run,
  type RunProgressEvent,
  type RunStatusEvent,
  runListSchema,
  runProgressEventSchema,
  runSchema,
  runStatusEventSchema,
} from '../../shared/schemas/runs'
import { type SpectrumResult, spectrumResultSchema } from '../../shared/schemas/spectrum'
import { isFinished } from '../../shared/vocabulary/runStatuses'
import { apiRequest } from './client'

export type { CreateRunBody, Run, RunMethod, RunSettings, RunStatus } from '../../shared/schemas/runs'
export type { SpectrumResult } from '../../shared/schemas/spectrum'

/** The body as the form fills it: defaults (5% damping, default grid, average acceleration) may be left out. */
export type NewRunInput = Pick<CreateRunBody, 'recordId'> & Partial<Omit<CreateRunBody, 'recordId'>>

/** `GET /api/runs`: the firm's runs, newest first, optionally of one project or record. */
export async function listRuns(query: { projectId?: string; recordId?: string } = {}): Promise<Run[]> {
  return (await apiRequest('/api/runs', runListSchema, { query })).items
}

/** `GET /api/runs/:id` */
export function getRun(id: string): Promise<Run> {
  return apiRequest(`/api/runs/${encodeURIComponent(id)}`, runSchema)
}

/** `POST /api/runs`: 202 with the queued run; 402 `no_credits` when the firm has none left. */
export function createRun(input: NewRunInput): Promise<Run> {
  return apiRequest('/api/runs', runSchema, { method: 'POST', body: input })
}

/** `POST /api/runs` of a record pair, with the combinations to compute (RotD50, RotD100, geometric mean). */
export function createPairRun(
  input: Pick<CreatePairRunBody, 'pairId' | 'combinations'> & Partial<CreatePairRunBody>,
): Promise<Run> {
  return apiRequest('/api/runs', runSchema, { method: 'POST', body: input })
}

/** `GET /api/runs/:id/spectrum`: the engine's JSON with the run's settings (409 until it succeeds). */
export function getRunSpectrum(id: string, signal?: AbortSignal): Promise<SpectrumResult> {
  return apiRequest(`/api/runs/${encodeURIComponent(id)}/spectrum`, spectrumResultSchema, { signal })
}

export interface RunEventHandlers {
  onProgress: (event: RunProgressEvent) => void
  onStatus: (event: RunStatusEvent) => void
}

/**
 * Follows `GET /api/runs/:id/events` (server-sent events) until the run ends; returns the
 * function that stops following. The server closes the stream after the final status, so the
 * EventSource is closed then rather than left to reconnect.
 */
export function followRun(id: string, handlers: RunEventHandlers): () => void {
  const source = new EventSource(`/api/runs/${encodeURIComponent(id)}/events`)
  const read = (data: string) => {
    try {
      return JSON.parse(data) as unknown
    } catch {
      return null
    }
  }
  source.addEventListener('progress', (event) => {
    const parsed = runProgressEventSchema.safeParse(read((event as MessageEvent<string>).data))
    if (parsed.success) handlers.onProgress(parsed.data)
  })
  source.addEventListener('status', (event) => {
    const parsed = runStatusEventSchema.safeParse(read((event as MessageEvent<string>).data))
    if (!parsed.success) return
    handlers.onStatus(parsed.data)
    if (isFinished(parsed.data.status)) source.close()
  })
  return () => source.close()
}
