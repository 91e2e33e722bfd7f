import { Router, type Request } from 'express'
import { signInBodySchema } from '../../shared/schemas/accounts.js'
import type { AppDeps } from '../deps.js'
import { toSessionInfo, verifyCredentials } from '../services/auth.js'
import { recordAudit } from '../services/audit.js'

/** Starts a fresh session for the user: a new session id at every sign-in defeats session fixation. */
export function startSession(req: Request, userId: string): Promise<void> {
  return new Promise((resolve, reject) => {
    req.session.regenerate((err) => {
      if (err) return reject(err)
      req.session.userId = userId
      req.session.save((saveErr) => (saveErr ? reject(saveErr) : resolve()))
    })
  })
}

export function authRouter(deps: AppDeps, signInLimiters: import('express').RequestHandler[] = []) {
  const router = Router()

  router.post('/auth/sign-in', ...signInLimiters, async (req, res) => {
    const body = signInBodySchema.parse(req.body)
    const member = await verifyCredentials(deps.db, body.email, body.password)
    await startSession(req, member.userId)
    res.json(toSessionInfo(member))
  })

  router.post('/auth/sign-out', (req, res, next) => {
    const member = req.member
    req.session.destroy((err) => {
      if (err) return next(err)
      if (member)
        recordAudit(deps.db, { firmId: member.firmId, userId: member.userId, action: 'auth.signed_out' })
      res.clearCookie(deps.sessionCookieName)
      res.status(204).end()
    })
  })

  return router
}
