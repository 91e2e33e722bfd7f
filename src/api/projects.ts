import {
  type CreateProjectBody,
  type Project,
  type UpdateProjectBody,
  projectListSchema,
  projectSchema,
} from '../../shared/schemas/projects'
import { apiRequest } from './client'

export type { CreateProjectBody, Project, UpdateProjectBody } from '../../shared/schemas/projects'

/** `GET /api/projects`: the firm's projects, the default one first. */
export async function listProjects(): Promise<Project[]> {
  return (await apiRequest('/api/projects', projectListSchema)).items
}

/** `POST /api/projects` (engineer or checker): answers the new project (201). */
export function createProject(body: CreateProjectBody): Promise<Project> {
  return apiRequest('/api/projects', projectSchema, { method: 'POST', body })
}

/** `PATCH /api/projects/:id`: rename or archive; 409 for archiving the default project. */
export function updateProject(id: string, body: UpdateProjectBody): Promise<Project> {
  return apiRequest(`/api/projects/${encodeURIComponent(id)}`, projectSchema, { method: 'PATCH', body })
}
