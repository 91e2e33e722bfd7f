import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import { createProjectBodySchema, updateProjectBodySchema } from '../../shared/schemas/projects.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireMember, requireRole } from '../middleware/auth.js'
import { createProject, listProjects, updateProject } from '../services/projects.js'

export function projectsRouter(deps: AppDeps) {
  const router = Router()

  router.get('/projects', requireMember, (req, res) => {
    res.json({ items: listProjects(deps.db, memberOf(req).firmId) })
  })

  // Role table (accounts issue): engineers and checkers create projects; an admin only when also an engineer.
  router.post('/projects', requireRole('engineer', 'checker'), (req, res) => {
    const body = createProjectBodySchema.parse(req.body)
    res.status(201).json(createProject(deps.db, memberOf(req), body))
  })

  // Renaming and archiving are project housekeeping, open to those who create projects.
  router.patch('/projects/:id', requireRole('engineer', 'checker'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const body = updateProjectBodySchema.parse(req.body)
    res.json(updateProject(deps.db, memberOf(req), id, body))
  })

  return router
}
