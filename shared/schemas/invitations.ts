import { z } from 'zod'
import { listOf, nameInputSchema } from './common.js'
import { passwordSchema, roleSchema } from './accounts.js'
import { rolesSchema } from './members.js'
import { emailSchema } from './tokens.js'

/** POST /api/firm/invitations */
export const createInvitationBodySchema = z.strictObject({ email: emailSchema, roles: rolesSchema })
export type CreateInvitationBody = z.input<typeof createInvitationBodySchema>

/** A pending invitation as the firm's admins see it. */
export const invitationSchema = z.object({
  id: z.string(),
  email: z.string(),
  roles: z.array(roleSchema),
  invitedByName: z.string(),
  expiresAt: z.number(),
  createdAt: z.number(),
})
export type Invitation = z.infer<typeof invitationSchema>

export const invitationListSchema = listOf(invitationSchema)
export type InvitationList = z.infer<typeof invitationListSchema>

/** GET /api/invitations/:token: what the invitee sees before accepting, and which firm it is. */
export const invitationPreviewSchema = invitationSchema
  .pick({ email: true, roles: true, invitedByName: true, expiresAt: true })
  .extend({ firmName: z.string() })
export type InvitationPreview = z.infer<typeof invitationPreviewSchema>

/** POST /api/invitations/:token/accept */
export const acceptInvitationBodySchema = z.strictObject({
  name: nameInputSchema('Enter your name.', 120),
  password: passwordSchema,
})
export type AcceptInvitationBody = z.input<typeof acceptInvitationBodySchema>
