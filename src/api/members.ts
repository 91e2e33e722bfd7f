import { z } from 'zod'
import type { Role } from '../../shared/schemas/accounts'
import { type FirmMember, memberListSchema, memberSchema } from '../../shared/schemas/members'
import { apiRequest } from './client'

export type { FirmMember } from '../../shared/schemas/members'

/** `GET /api/firm/members` (admin): the members of the signed-in admin's firm. */
export async function listMembers(): Promise<FirmMember[]> {
  return (await apiRequest('/api/firm/members', memberListSchema)).items
}

/** `PATCH /api/firm/members/:id` (admin): replaces a member's roles; 409 `last_admin` if that would leave no admin. */
export function updateMemberRoles(id: string, roles: Role[]): Promise<FirmMember> {
  return apiRequest(`/api/firm/members/${encodeURIComponent(id)}`, memberSchema, {
    method: 'PATCH',
    body: { roles },
  })
}

/** `DELETE /api/firm/members/:id` (admin): removes the member from the firm (204). */
export async function removeMember(id: string): Promise<void> {
  await apiRequest(`/api/firm/members/${encodeURIComponent(id)}`, z.undefined(), { method: 'DELETE' })
}
