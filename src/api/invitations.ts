import { z } from 'zod'
import { sessionInfoSchema, type SessionInfo } from '../../shared/schemas/accounts'
import {
  type AcceptInvitationBody,
  type CreateInvitationBody,
  type Invitation,
  type InvitationPreview,
  invitationListSchema,
  invitationPreviewSchema,
  invitationSchema,
} from '../../shared/schemas/invitations'
import { apiRequest } from './client'

export type { Invitation, InvitationPreview } from '../../shared/schemas/invitations'

/** `GET /api/invitations/:token`: what the invitee sees before accepting. */
export function previewInvitation(token: string): Promise<InvitationPreview> {
  return apiRequest(`/api/invitations/${encodeURIComponent(token)}`, invitationPreviewSchema)
}

/** `POST /api/invitations/:token/accept`: creates the member and signs them in. */
export function acceptInvitation(token: string, body: AcceptInvitationBody): Promise<SessionInfo> {
  return apiRequest(`/api/invitations/${encodeURIComponent(token)}/accept`, sessionInfoSchema, {
    method: 'POST',
    body,
  })
}

/** `GET /api/firm/invitations` (admin): the firm's pending invitations. */
export async function listInvitations(): Promise<Invitation[]> {
  return (await apiRequest('/api/firm/invitations', invitationListSchema)).items
}

/** `POST /api/firm/invitations` (admin): invites someone by e-mail. */
export function createInvitation(body: CreateInvitationBody): Promise<Invitation> {
  return apiRequest('/api/firm/invitations', invitationSchema, { method: 'POST', body })
}

/** `DELETE /api/firm/invitations/:id` (admin). */
export async function revokeInvitation(id: string): Promise<void> {
  await apiRequest(`/api/firm/invitations/${encodeURIComponent(id)}`, z.undefined(), { method: 'DELETE' })
}
