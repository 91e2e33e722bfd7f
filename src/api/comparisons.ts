import {
  type ComparisonDrawing,
  type ComparisonSummary,
  type ComparisonView,
  type CreateComparisonBody,
  type PreviewComparisonBody,
  type UpdateComparisonBody,
  comparisonDrawingSchema,
  comparisonListSchema,
  comparisonViewSchema,
} from '../../shared/schemas/comparisons'
import { apiRequest } from './client'

export type {
  Combination,
  ComparisonDrawing,
  ComparisonSummary,
  ComparisonTargetInput,
  ComparisonView,
  CreateComparisonBody,
  MeanKind,
  PreviewComparisonBody,
  UpdateComparisonBody,
} from '../../shared/schemas/comparisons'

/** `GET /api/comparisons`: the firm's comparisons with their review state, newest first. */
export async function listComparisons(): Promise<ComparisonSummary[]> {
  return (await apiRequest('/api/comparisons', comparisonListSchema)).items
}

/** `GET /api/comparisons/:id`: the chart and scale-factor table data. */
export function getComparison(id: string): Promise<ComparisonView> {
  return apiRequest(`/api/comparisons/${encodeURIComponent(id)}`, comparisonViewSchema)
}

/** `POST /api/comparisons/preview`: the same data for inputs not yet saved. */
export function previewComparison(
  body: PreviewComparisonBody,
  signal?: AbortSignal,
): Promise<ComparisonDrawing> {
  return apiRequest('/api/comparisons/preview', comparisonDrawingSchema, { method: 'POST', body, signal })
}

/** `POST /api/comparisons` (engineer or checker): 201 with the saved comparison's view. */
export function createComparison(body: CreateComparisonBody): Promise<ComparisonView> {
  return apiRequest('/api/comparisons', comparisonViewSchema, { method: 'POST', body })
}

/** `PATCH /api/comparisons/:id`: 409 `under_review` or `locked` once submitted or checked. */
export function updateComparison(id: string, body: UpdateComparisonBody): Promise<ComparisonView> {
  return apiRequest(`/api/comparisons/${encodeURIComponent(id)}`, comparisonViewSchema, {
    method: 'PATCH',
    body,
  })
}
