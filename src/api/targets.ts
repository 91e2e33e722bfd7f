import {
  type CreateTargetBody,
  type Target,
  type TargetPreview,
  type TargetPreviewBody,
  targetListSchema,
  targetPreviewSchema,
  targetSchema,
} from '../../shared/schemas/targets'
import { apiRequest } from './client'

export type {
  CreateTargetBody,
  Target,
  TargetDefinitionValue,
  TargetInput,
  TargetPreview,
  TargetPreviewBody,
} from '../../shared/schemas/targets'

/** `POST /api/targets/preview`: the target's Sa (g) at the given periods, null where undefined. */
export function previewTarget(body: TargetPreviewBody, signal?: AbortSignal): Promise<TargetPreview> {
  return apiRequest('/api/targets/preview', targetPreviewSchema, { method: 'POST', body, signal })
}

/** `GET /api/targets`: the firm's saved targets, optionally of one project. */
export async function listTargets(projectId?: string): Promise<Target[]> {
  return (await apiRequest('/api/targets', targetListSchema, { query: { projectId } })).items
}

/** `POST /api/targets` (engineer or checker): 201 with the saved target. */
export function createTarget(body: CreateTargetBody): Promise<Target> {
  return apiRequest('/api/targets', targetSchema, { method: 'POST', body })
}
