import { Router, type RequestHandler } from 'express'
import {
  completePasswordResetBodySchema,
  requestPasswordResetBodySchema,
} from '../../shared/schemas/passwordResets.js'
import { tokenParamsSchema } from '../../shared/schemas/tokens.js'
import type { AppDeps } from '../deps.js'
import { linkOrigin } from '../mail/links.js'
import { completePasswordReset, requestPasswordReset } from '../services/passwordResets.js'

const REQUESTED =
  'If that address belongs to an Ordinate account, a link to choose a new password is on its way. It works for one hour.'

/** Password resets by e-mail link. The request answers 202 whatever the address, so it reveals nothing. */
export function passwordResetsRouter(deps: AppDeps, requestLimiters: RequestHandler[] = []) {
  const router = Router()

  router.post('/auth/password-reset', ...requestLimiters, (req, res) => {
    const { email } = requestPasswordResetBodySchema.parse(req.body)
    requestPasswordReset(deps.db, email, linkOrigin(req, deps.config))
    deps.mailDispatcher?.wake()
    res.status(202).json({ message: REQUESTED })
  })

  router.post('/auth/password-reset/:token', async (req, res) => {
    const { token } = tokenParamsSchema.parse(req.params)
    const { password } = completePasswordResetBodySchema.parse(req.body)
    await completePasswordReset(deps.db, token, password)
    res.status(204).end()
  })

  return router
}
