import { and, asc, desc, eq } from 'drizzle-orm'
import type { CreateProjectBody, Project } from '../../shared/schemas/projects.js'
import type { Db } from '../db/client.js'
import { projects } from '../db/schema.js'
import { notFound } from '../httpError.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { recordAudit } from './audit.js'

const projectColumns = {
  id: projects.id,
  name: projects.name,
  description: projects.description,
  isDefault: projects.isDefault,
  createdBy: projects.createdBy,
  createdAt: projects.createdAt,
}

/** The firm's projects, the default one first, then newest first. */
export function listProjects(db: Db, firmId: string): Project[] {
  return db
    .select(projectColumns)
    .from(projects)
    .where(eq(projects.firmId, firmId))
    .orderBy(desc(projects.isDefault), desc(projects.createdAt), asc(projects.name))
    .all()
}

export function createProject(db: Db, member: Member, input: CreateProjectBody): Project {
  const project: Project = {
    id: newId(),
    name: input.name,
    description: input.description,
    isDefault: false,
    createdBy: member.userId,
    createdAt: Date.now(),
  }
  db.transaction((tx) => {
    tx.insert(projects)
      .values({ ...project, firmId: member.firmId })
      .run()
    recordAudit(tx, {
      firmId: member.firmId,
      userId: member.userId,
      action: 'project.created',
      subjectType: 'project',
      subjectId: project.id,
      detail: { name: project.name },
    })
  })
  return project
}

/**
 * The project a new record or pair goes into: the given one when it belongs to the firm
 * (another firm's id answers 404), otherwise the firm's default project.
 */
export function resolveProject(db: Pick<Db, 'select'>, firmId: string, projectId?: string): Project {
  const where = projectId
    ? and(eq(projects.firmId, firmId), eq(projects.id, projectId))
    : and(eq(projects.firmId, firmId), eq(projects.isDefault, true))
  const row = db.select(projectColumns).from(projects).where(where).get()
  if (!row) throw notFound(projectId ? 'The project' : 'The firm’s default project')
  return row
}
