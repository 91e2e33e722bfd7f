import { and, asc, eq, isNull } from 'drizzle-orm'
import type { Role } from '../../shared/schemas/accounts.js'
import type { FirmMember } from '../../shared/schemas/members.js'
import type { Db } from '../db/client.js'
import { memberships, passwordResets, users } from '../db/schema.js'
import { conflict, notFound } from '../httpError.js'
import type { Member } from '../middleware/auth.js'
import { recordAudit } from './audit.js'
import { endSessionsOfUser } from './sessions.js'

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]

const memberColumns = {
  id: memberships.id,
  userId: users.id,
  email: users.email,
  name: users.name,
  roles: memberships.roles,
  joinedAt: memberships.createdAt,
}

const toMember = (row: { roles: string[] } & Omit<FirmMember, 'roles'>): FirmMember => ({
  ...row,
  roles: row.roles as Role[],
})

/** The members of the signed-in member's firm, by name. */
export function listMembers(db: Db, member: Member): FirmMember[] {
  return db
    .select(memberColumns)
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.firmId, member.firmId))
    .orderBy(asc(users.name))
    .all()
    .map(toMember)
}

/** A member of the firm by membership id; another firm's id is simply not found. */
function findFirmMember(db: Db | Tx, firmId: string, membershipId: string): FirmMember {
  const row = db
    .select(memberColumns)
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.id, membershipId), eq(memberships.firmId, firmId)))
    .get()
  if (!row) throw notFound('That member')
  return toMember(row)
}

function adminCount(tx: Tx, firmId: string): number {
  return tx
    .select({ roles: memberships.roles })
    .from(memberships)
    .where(eq(memberships.firmId, firmId))
    .all()
    .filter((m) => m.roles.includes('admin')).length
}

/** Refuses a change that would leave the firm with nobody able to manage members or buy credits. */
function keepAnAdmin(tx: Tx, firmId: string, target: FirmMember, actor: Member, action: 'remove' | 'demote') {
  if (!target.roles.includes('admin') || adminCount(tx, firmId) > 1) return
  const who = target.userId === actor.userId ? 'You are' : 'This member is'
  const what = action === 'remove' ? 'leave the firm' : 'give up the admin role'
  throw conflict(
    `${who} the firm's only admin and cannot ${what}. Give another member the admin role first.`,
    'last_admin',
  )
}

/** PATCH /api/firm/members/:id: replaces the member's roles. */
export function updateMemberRoles(
  db: Db,
  actor: Member,
  membershipId: string,
  input: { roles: Role[] },
): FirmMember {
  return db.transaction(
    (tx) => {
      const target = findFirmMember(tx, actor.firmId, membershipId)
      if (!input.roles.includes('admin')) keepAnAdmin(tx, actor.firmId, target, actor, 'demote')
      tx.update(memberships).set({ roles: input.roles }).where(eq(memberships.id, target.id)).run()
      recordAudit(tx, {
        firmId: actor.firmId,
        userId: actor.userId,
        action: 'member.roles_changed',
        subjectType: 'membership',
        subjectId: target.id,
        detail: { email: target.email, from: target.roles, to: input.roles },
      })
      return { ...target, roles: input.roles }
    },
    { behavior: 'immediate' },
  )
}

/**
 * DELETE /api/firm/members/:id: removes the membership. The user row stays, because the firm's
 * records and runs still name who made them; the person is signed out everywhere and can
 * only come back through a new invitation.
 */
export function removeMember(db: Db, actor: Member, membershipId: string): void {
  db.transaction(
    (tx) => {
      const target = findFirmMember(tx, actor.firmId, membershipId)
      keepAnAdmin(tx, actor.firmId, target, actor, 'remove')
      tx.delete(memberships).where(eq(memberships.id, target.id)).run()
      tx.update(passwordResets)
        .set({ usedAt: Date.now() })
        .where(and(eq(passwordResets.userId, target.userId), isNull(passwordResets.usedAt)))
        .run()
      endSessionsOfUser(db, target.userId)
      recordAudit(tx, {
        firmId: actor.firmId,
        userId: actor.userId,
        action: 'member.removed',
        subjectType: 'membership',
        subjectId: target.id,
        detail: { email: target.email, userId: target.userId, roles: target.roles },
      })
    },
    { behavior: 'immediate' },
  )
}
