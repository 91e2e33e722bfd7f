import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import { updateMemberBodySchema } from '../../shared/schemas/members.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireAction } from '../middleware/auth.js'
import { listMembers, removeMember, updateMemberRoles } from '../services/members.js'

/** The signed-in admin's own firm: its members and their roles. */
export function membersRouter(deps: AppDeps) {
  const router = Router()
  const admin = requireAction('members.manage')

  router.get('/firm/members', admin, (req, res) => {
    res.json({ items: listMembers(deps.db, memberOf(req)) })
  })

  router.patch('/firm/members/:id', admin, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    const body = updateMemberBodySchema.parse(req.body)
    res.json(updateMemberRoles(deps.db, memberOf(req), id, body))
  })

  router.delete('/firm/members/:id', admin, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    removeMember(deps.db, memberOf(req), id)
    res.status(204).end()
  })

  return router
}
