import { z } from 'zod'
import {
  type CreateRecordPairBody,
  type RecordPair,
  type RecordPairDetail,
  recordPairListSchema,
  recordPairSchema,
} from '../../shared/schemas/recordPairs'
import { apiRequest } from './client'

export type { CreateRecordPairBody, RecordPair, RecordPairDetail } from '../../shared/schemas/recordPairs'

/** `GET /api/record-pairs`: the firm's pairs, newest first. */
export async function listRecordPairs(): Promise<RecordPairDetail[]> {
  return (await apiRequest('/api/record-pairs', recordPairListSchema)).items
}

/** `POST /api/record-pairs` (engineer or checker): 400 naming the mismatch, 409 when already paired. */
export function createRecordPair(body: CreateRecordPairBody): Promise<RecordPair> {
  return apiRequest('/api/record-pairs', recordPairSchema, { method: 'POST', body })
}

/** `DELETE /api/record-pairs/:id` (204): 409 `pair_in_use` while a run uses the pair. */
export async function deleteRecordPair(id: string): Promise<void> {
  await apiRequest(`/api/record-pairs/${encodeURIComponent(id)}`, z.undefined(), { method: 'DELETE' })
}
