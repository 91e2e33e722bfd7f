import {
  type CreateProcessedRecordBody,
  type FourierSpectrumBody,
  type ProcessingPreview,
  type ProcessingSettingsBody,
  fourierSpectrumSchema,
  processingPreviewSchema,
} from '../../shared/schemas/processing'
import { type RecordDetail, recordDetailSchema } from '../../shared/schemas/records'
import { apiRequest } from './client'

export type { ProcessingPreview, ProcessingSettingsBody } from '../../shared/schemas/processing'

const base = (id: string) => `/api/records/${encodeURIComponent(id)}`

/** `POST /api/records/:id/processing/preview`: before and after, nothing stored. */
export function previewProcessing(
  id: string,
  settings: ProcessingSettingsBody,
  signal?: AbortSignal,
): Promise<ProcessingPreview> {
  return apiRequest(`${base(id)}/processing/preview`, processingPreviewSchema, {
    method: 'POST',
    body: settings,
    signal,
  })
}

/** `POST /api/records/:id/processed`: stores the processed child record and answers it. */
export function createProcessedRecord(id: string, body: CreateProcessedRecordBody): Promise<RecordDetail> {
  return apiRequest(`${base(id)}/processed`, recordDetailSchema, { method: 'POST', body })
}

/** `GET /api/records/:id/fourier` */
export function getRecordFourier(id: string): Promise<FourierSpectrumBody> {
  return apiRequest(`${base(id)}/fourier`, fourierSpectrumSchema)
}
