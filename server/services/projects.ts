import { and, asc, desc, eq, sql } from 'drizzle-orm'
import type { CreateProjectBody, Project, UpdateProjectBody } from '../../shared/schemas/projects.js'
import type { Db, Tx } from '../db/client.js'
import { projects } from '../db/schema.js'
import { conflict, notFound } from '../httpError.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { recordAudit } from './audit.js'

const projectColumns = {
  id: projects.id,
  name: projects.name,
  description: projects.description,
  isDefault: projects.isDefault,
  archived: sql<boolean>`${projects.archivedAt} is not null`.mapWith(Boolean),
  createdBy: projects.createdBy,
  createdAt: projects.createdAt,
}

/** The firm's projects, the default one first, then active before archived, then newest first. */
export function listProjects(db: Db, firmId: string): Project[] {
  return db
    .select(projectColumns)
    .from(projects)
    .where(eq(projects.firmId, firmId))
    .orderBy(desc(projects.isDefault), asc(projects.archivedAt), desc(projects.createdAt), asc(projects.name))
    .all()
}

export function createProject(db: Db, member: Member, input: CreateProjectBody): Project {
  const project: Project = {
    id: newId(),
    name: input.name,
    description: input.description,
    isDefault: false,
    archived: false,
    createdBy: member.userId,
    createdAt: Date.now(),
  }
  db.transaction((tx) => {
    const { archived: _archived, ...row } = project
    tx.insert(projects)
      .values({ ...row, firmId: member.firmId })
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
export function resolveProject(db: Tx, firmId: string, projectId?: string): Project {
  const where = projectId
    ? and(eq(projects.firmId, firmId), eq(projects.id, projectId))
    : and(eq(projects.firmId, firmId), eq(projects.isDefault, true))
  const row = db.select(projectColumns).from(projects).where(where).get()
  if (!row) throw notFound(projectId ? 'The project' : 'The firm’s default project')
  return row
}

/**
 * resolveProject for new work (uploads, runs, batches, pairs, comparisons): an archived project
 * answers 409 `project_archived`, naming it and the work refused. Reading its work stays allowed,
 * and restoring the project lifts the refusal. Call inside the transaction that writes the work,
 * so an archive in between cannot slip past.
 */
export function resolveOpenProject(
  db: Tx,
  firmId: string,
  projectId: string | undefined,
  work: string,
): Project {
  const project = resolveProject(db, firmId, projectId)
  if (project.archived) {
    throw conflict(
      `The project “${project.name}” is archived, so it takes no new ${work}. Its work can still be read; restore the project on the Projects page to add to it.`,
      'project_archived',
    )
  }
  return project
}

/**
 * PATCH /api/projects/:id: renames, archives or unarchives one of the firm's projects (another
 * firm's id answers 404). The default project, where uploads go when none is named, cannot be
 * archived. Archiving keeps everything in the project.
 */
export function updateProject(db: Db, member: Member, projectId: string, input: UpdateProjectBody): Project {
  return db.transaction(
    (tx) => {
      const current = resolveProject(tx, member.firmId, projectId)
      if (input.archived && current.isDefault) {
        throw conflict(
          'The default project cannot be archived: uploads go there when no project is chosen.',
          'default_project',
        )
      }
      const changes: { name?: string; archivedAt?: number | null } = {}
      if (input.name !== undefined && input.name !== current.name) changes.name = input.name
      if (input.archived !== undefined && input.archived !== current.archived) {
        changes.archivedAt = input.archived ? Date.now() : null
      }
      if (Object.keys(changes).length === 0) return current
      tx.update(projects).set(changes).where(eq(projects.id, projectId)).run()
      recordAudit(tx, {
        firmId: member.firmId,
        userId: member.userId,
        action: 'project.updated',
        subjectType: 'project',
        subjectId: projectId,
        detail: {
          ...(changes.name !== undefined ? { from: current.name, to: changes.name } : {}),
          ...(changes.archivedAt !== undefined ? { archived: changes.archivedAt !== null } : {}),
        },
      })
      return resolveProject(tx, member.firmId, projectId)
    },
    { behavior: 'immediate' },
  )
}
