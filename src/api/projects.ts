import {
  type CreateProjectBody,
  type Project,
  projectListSchema,
  projectSchema,
} from '../../shared/schemas/projects'
import { apiRequest } from './client'

export type { CreateProjectBody, Project } from '../../shared/schemas/projects'

/** `GET /api/projects`: the firm's projects, the default one first. */
export async function listProjects(): Promise<Project[]> {
  return (await apiRequest('/api/projects', projectListSchema)).items
}

/** `POST /api/projects` (engineer or checker): answers the new project (201). */
export function createProject(body: CreateProjectBody): Promise<Project> {
  return apiRequest('/api/projects', projectSchema, { method: 'POST', body })
}
