import { Router } from 'express'
import { idParamsSchema } from '../../shared/schemas/common.js'
import { acceptInvitationBodySchema, createInvitationBodySchema } from '../../shared/schemas/invitations.js'
import { tokenParamsSchema } from '../../shared/schemas/tokens.js'
import type { AppDeps } from '../deps.js'
import { linkOrigin } from '../mail/links.js'
import { findMember, memberOf, requireAction } from '../middleware/auth.js'
import { toSessionInfo } from '../services/auth.js'
import {
  acceptInvitation,
  createInvitation,
  listInvitations,
  previewInvitation,
  revokeInvitation,
} from '../services/invitations.js'
import { startSession } from './auth.js'

/** Invitations: sent by a firm's admins, opened and accepted by the invitee through the link in the mail. */
export function invitationsRouter(deps: AppDeps) {
  const router = Router()
  const admin = requireAction('members.manage')

  router.get('/firm/invitations', admin, (req, res) => {
    res.json({ items: listInvitations(deps.db, memberOf(req)) })
  })

  router.post('/firm/invitations', admin, (req, res) => {
    const body = createInvitationBodySchema.parse(req.body)
    const invitation = createInvitation(deps.db, memberOf(req), body, linkOrigin(req, deps.config))
    deps.mailDispatcher?.wake()
    res.status(201).json(invitation)
  })

  router.delete('/firm/invitations/:id', admin, (req, res) => {
    const { id } = idParamsSchema.parse(req.params)
    revokeInvitation(deps.db, memberOf(req), id)
    res.status(204).end()
  })

  router.get('/invitations/:token', (req, res) => {
    const { token } = tokenParamsSchema.parse(req.params)
    res.json(previewInvitation(deps.db, token))
  })

  router.post('/invitations/:token/accept', async (req, res) => {
    const { token } = tokenParamsSchema.parse(req.params)
    const body = acceptInvitationBodySchema.parse(req.body)
    const userId = await acceptInvitation(deps.db, token, body)
    await startSession(req, userId)
    const member = findMember(deps.db, userId)
    if (!member) throw new Error(`membership of ${userId} missing right after acceptance`)
    res.status(201).json(toSessionInfo(member))
  })

  return router
}
