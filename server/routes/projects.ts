import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import { createProjectBodySchema, updateProjectBodySchema } from '../../shared/schemas/projects.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
import { createProject, listProjects, updateProject } from '../services/projects.js'

export function projectsRouter(deps: AppDeps) {
  const router = Router()

  router.get('/projects', requireMember, (req, res) => {
    res.json({ items: listProjects(deps.db, memberOf(req).firmId) })
  })

  router.post('/projects', requireAction('projects.manage'), (req, res) => {
    const body = createProjectBodySchema.parse(req.body)
    res.status(201).json(createProject(deps.db, memberOf(req), body))
  })

  router.patch('/projects/:id', requireAction('projects.manage'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const body = updateProjectBodySchema.parse(req.body)
    res.json(updateProject(deps.db, memberOf(req), id, body))
  })

  return router
}
