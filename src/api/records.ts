import { z } from 'zod'
import {
  type RecordDetail,
  type RecordInfo,
  type RecordSamples,
  recordDetailSchema,
  recordListSchema,
  recordSamplesSchema,
  recordSchema,
} from '../../shared/schemas/records'
import type { SourceUnits } from '../../shared/spectra/units'
import { ApiError, apiErrorOf, apiRequest } from './client'

export type { RecordDetail, RecordInfo, RecordSamples } from '../../shared/schemas/records'

/** `GET /api/records`: the firm's records, newest first, optionally of one project. */
export async function listRecords(projectId?: string): Promise<RecordDetail[]> {
  return (await apiRequest('/api/records', recordListSchema, { query: { projectId } })).items
}

/** `GET /api/records/:id` */
export function getRecord(id: string): Promise<RecordDetail> {
  return apiRequest(`/api/records/${encodeURIComponent(id)}`, recordDetailSchema)
}

/** `GET /api/records/:id/samples`: SI series, thinned to at most maxPoints with every peak kept. */
export function getRecordSamples(
  id: string,
  maxPoints: number,
  signal?: AbortSignal,
): Promise<RecordSamples> {
  return apiRequest(`/api/records/${encodeURIComponent(id)}/samples`, recordSamplesSchema, {
    query: { maxPoints },
    signal,
  })
}

/** `DELETE /api/records/:id`: the uploader or an admin; 409 while a run uses the record. */
export async function deleteRecord(id: string): Promise<void> {
  await apiRequest(`/api/records/${encodeURIComponent(id)}`, z.undefined(), { method: 'DELETE' })
}

export interface UploadRecordInput {
  file: File
  name?: string
  units?: SourceUnits
  dtS?: number
  component?: string
  projectId?: string
}

export interface UploadHandle {
  /** Resolves the new record (with its warnings); rejects with ApiError in the server's error shape. */
  done: Promise<RecordInfo>
  abort: () => void
}

// The header the server's CSRF guard accepts from Ordinate's own client (see src/api/client.ts).
const CLIENT_HEADER = 'X-Ordinate-Client'

function errorFromXhr(xhr: XMLHttpRequest): ApiError {
  let body: unknown = null
  try {
    body = JSON.parse(xhr.responseText)
  } catch {
    // not JSON: fall through to a message built from the status
  }
  return apiErrorOf(xhr.status, xhr.statusText, body)
}

/**
 * `POST /api/records` as multipart, through XMLHttpRequest because fetch reports no upload
 * progress. `onProgress` receives the fraction of the file sent (0–1).
 */
export function uploadRecord(input: UploadRecordInput, onProgress: (fraction: number) => void): UploadHandle {
  const form = new FormData()
  for (const [key, value] of [
    ['name', input.name],
    ['units', input.units],
    ['dtS', input.dtS === undefined ? undefined : String(input.dtS)],
    ['component', input.component],
    ['projectId', input.projectId],
  ] as const) {
    if (value !== undefined && value !== '') form.append(key, value)
  }
  form.append('file', input.file, input.file.name)

  const xhr = new XMLHttpRequest()
  const done = new Promise<RecordInfo>((resolve, reject) => {
    xhr.open('POST', '/api/records')
    xhr.setRequestHeader(CLIENT_HEADER, '1')
    xhr.setRequestHeader('Accept', 'application/json')
    xhr.withCredentials = true
    xhr.upload.onprogress = (event) => {
      if (event.lengthComputable && event.total > 0) onProgress(event.loaded / event.total)
    }
    xhr.onload = () => {
      if (xhr.status !== 201) return reject(errorFromXhr(xhr))
      let body: unknown
      try {
        body = JSON.parse(xhr.responseText)
      } catch {
        return reject(
          new ApiError(xhr.status, 'bad_response', 'The server sent an answer Ordinate could not read.'),
        )
      }
      const parsed = recordSchema.safeParse(body)
      if (!parsed.success) {
        return reject(
          new ApiError(xhr.status, 'bad_response', 'The server sent an answer Ordinate did not expect.'),
        )
      }
      onProgress(1)
      resolve(parsed.data)
    }
    xhr.onerror = () =>
      reject(
        new ApiError(
          0,
          'network',
          'Ordinate could not reach its server. Check the connection and try again.',
        ),
      )
    xhr.onabort = () => reject(new DOMException('The upload was cancelled.', 'AbortError'))
    xhr.send(form)
  })
  return { done, abort: () => xhr.abort() }
}
