import { z } from 'zod'
import { listOf } from './common.js'
import { roleSchema, type Role } from './accounts.js'

const ROLE_ORDER = roleSchema.options

/** One to three distinct roles, answered in the canonical order engineer, checker, admin. */
export const rolesSchema = z
  .array(roleSchema)
  .min(1, 'Choose at least one role.')
  .refine((roles) => new Set(roles).size === roles.length, 'Each role may appear once.')
  .transform((roles): Role[] => ROLE_ORDER.filter((r) => roles.includes(r)))

/** A member of the signed-in member's firm (GET /api/firm/members). `id` is the membership id. */
export const memberSchema = z.object({
  id: z.string(),
  userId: z.string(),
  email: z.string(),
  name: z.string(),
  roles: z.array(roleSchema),
  joinedAt: z.number(),
})
export type FirmMember = z.infer<typeof memberSchema>

export const memberListSchema = listOf(memberSchema)
export type MemberList = z.infer<typeof memberListSchema>

/** PATCH /api/firm/members/:id */
export const updateMemberBodySchema = z.strictObject({ roles: rolesSchema })
export type UpdateMemberBody = z.input<typeof updateMemberBodySchema>
