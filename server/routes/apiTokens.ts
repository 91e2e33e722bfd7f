import { Router } from 'express'
import { createApiTokenBodySchema } from '../../shared/schemas/apiTokens.js'
import { idParamsSchema } from '../../shared/schemas/common.js'
import type { AppDeps } from '../deps.js'
import { forbidden } from '../httpError.js'
import { memberOf, requireAction, requireMember } from '../middleware/auth.js'
import { createApiToken, listFirmTokens, listMyTokens, revokeApiToken } from '../services/apiTokens.js'

export function apiTokensRouter(deps: AppDeps) {
  const router = Router()

  router.get('/me/tokens', requireMember, (req, res) => {
    res.json({ items: listMyTokens(deps.db, memberOf(req)) })
  })

  // A token cannot mint tokens: a leaked one must not be able to outlive its own revocation.
  router.post('/me/tokens', requireMember, (req, res) => {
    if (req.apiTokenId) throw forbidden('Create API tokens while signed in, not with another token.')
    const body = createApiTokenBodySchema.parse(req.body)
    res.status(201).json(createApiToken(deps.db, memberOf(req), body))
  })

  router.delete('/me/tokens/:id', requireMember, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    revokeApiToken(deps.db, memberOf(req), id, 'own')
    res.status(204).end()
  })

  // Seeing and revoking the firm's tokens belongs with managing its members.
  router.get('/firm/tokens', requireAction('members.manage'), (req, res) => {
    res.json({ items: listFirmTokens(deps.db, memberOf(req)) })
  })

  router.delete('/firm/tokens/:id', requireAction('members.manage'), (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    revokeApiToken(deps.db, memberOf(req), id, 'firm')
    res.status(204).end()
  })

  return router
}
