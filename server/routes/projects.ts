import { Router } from 'express'
import { createProjectBodySchema } from '../../shared/schemas/projects.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireMember, requireRole } from '../middleware/auth.js'
import { createProject, listProjects } from '../services/projects.js'

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

  return router
}
