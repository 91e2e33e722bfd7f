import { Router } from 'express'
import { updateMeBodySchema } from '../../shared/schemas/me.js'
import type { AppDeps } from '../deps.js'
import { memberOf, requireMember } from '../middleware/auth.js'
import { getMe, updateMe } from '../services/me.js'

/** The signed-in member's own account: who they are and their preferences. */
export function meRouter(deps: AppDeps) {
  const router = Router()

  router.get('/me', requireMember, (req, res) => {
    res.json(getMe(deps.db, memberOf(req)))
  })

  router.patch('/me', requireMember, (req, res) => {
    const body = updateMeBodySchema.parse(req.body)
    res.json(updateMe(deps.db, memberOf(req), body))
  })

  return router
}
