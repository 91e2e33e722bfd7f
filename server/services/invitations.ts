import { and, asc, eq, gt, isNull } from 'drizzle-orm'
import type { Role } from '../../shared/schemas/accounts.js'
import type { Invitation, InvitationPreview } from '../../shared/schemas/invitations.js'
import type { Db } from '../db/client.js'
import { firms, invitations, memberships, users } from '../db/schema.js'
import { conflict, notFound } from '../httpError.js'
import { newId } from '../ids.js'
import { appLink } from '../mail/links.js'
import { invitationMail } from '../mail/templates.js'
import type { Member } from '../middleware/auth.js'
import { recordAudit } from './audit.js'
import { hashPassword } from './auth.js'
import { enqueueMail } from './mail.js'
import { hashToken, newToken, usableLink } from './tokens.js'

/** Invitations expire 72 hours after they are sent. */
export const INVITATION_TTL_MS = 72 * 60 * 60 * 1000

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]

const pendingFor = (firmId: string, now: number) =>
  and(eq(invitations.firmId, firmId), isNull(invitations.acceptedAt), gt(invitations.expiresAt, now))

/** The account an address already has in some firm, if any (a user belongs to one firm at most). */
function existingMembership(db: Db | Tx, email: string) {
  return db
    .select({ userId: users.id, firmId: memberships.firmId })
    .from(users)
    .innerJoin(memberships, eq(memberships.userId, users.id))
    .where(eq(users.email, email))
    .get()
}

/**
 * POST /api/firm/invitations: records the invitation, queues the mail with the link and
 * supersedes any earlier pending invitation of the same address to the same firm, all at once.
 */
export function createInvitation(
  db: Db,
  actor: Member,
  input: { email: string; roles: Role[] },
  origin: string,
): Invitation {
  const existing = existingMembership(db, input.email)
  if (existing) {
    throw conflict(
      existing.firmId === actor.firmId
        ? `${input.email} is already a member of this firm.`
        : `${input.email} already has an Ordinate account with another firm.`,
      'already_member',
    )
  }
  const { token, tokenHash } = newToken()
  const now = Date.now()
  const invitation: Invitation = {
    id: newId(),
    email: input.email,
    roles: input.roles,
    invitedByName: actor.name,
    expiresAt: now + INVITATION_TTL_MS,
    createdAt: now,
  }
  db.transaction(
    (tx) => {
      tx.update(invitations)
        .set({ expiresAt: now })
        .where(and(pendingFor(actor.firmId, now), eq(invitations.email, input.email)))
        .run()
      tx.insert(invitations)
        .values({
          id: invitation.id,
          firmId: actor.firmId,
          email: input.email,
          roles: input.roles,
          tokenHash,
          invitedBy: actor.userId,
          expiresAt: invitation.expiresAt,
          createdAt: now,
        })
        .run()
      enqueueMail(tx, {
        to: input.email,
        ...invitationMail({
          firmName: actor.firmName,
          inviterName: actor.name,
          roles: input.roles,
          url: appLink(origin, `/invitations/${token}`),
          expiresAt: invitation.expiresAt,
        }),
      })
      recordAudit(tx, {
        firmId: actor.firmId,
        userId: actor.userId,
        action: 'invitation.created',
        subjectType: 'invitation',
        subjectId: invitation.id,
        detail: { email: input.email, roles: input.roles },
      })
    },
    { behavior: 'immediate' },
  )
  return invitation
}

/** GET /api/firm/invitations: the firm's invitations still waiting for an answer. */
export function listInvitations(db: Db, actor: Member): Invitation[] {
  return db
    .select({
      id: invitations.id,
      email: invitations.email,
      roles: invitations.roles,
      invitedByName: users.name,
      expiresAt: invitations.expiresAt,
      createdAt: invitations.createdAt,
    })
    .from(invitations)
    .innerJoin(users, eq(users.id, invitations.invitedBy))
    .where(pendingFor(actor.firmId, Date.now()))
    .orderBy(asc(invitations.createdAt))
    .all()
    .map((row) => ({ ...row, roles: row.roles as Role[] }))
}

/** DELETE /api/firm/invitations/:id: the link stops working at once. */
export function revokeInvitation(db: Db, actor: Member, invitationId: string): void {
  const now = Date.now()
  const revoked = db
    .update(invitations)
    .set({ expiresAt: now })
    .where(and(eq(invitations.id, invitationId), pendingFor(actor.firmId, now)))
    .returning({ email: invitations.email })
    .get()
  if (!revoked) throw notFound('That pending invitation')
  recordAudit(db, {
    firmId: actor.firmId,
    userId: actor.userId,
    action: 'invitation.revoked',
    subjectType: 'invitation',
    subjectId: invitationId,
    detail: { email: revoked.email },
  })
}

/** The invitation a token opens, still pending; an unknown token is 404, a spent or expired one 410. */
function pendingInvitation(db: Db | Tx, token: string) {
  const row = db
    .select({
      id: invitations.id,
      firmId: invitations.firmId,
      email: invitations.email,
      roles: invitations.roles,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      firmName: firms.name,
      invitedByName: users.name,
    })
    .from(invitations)
    .innerJoin(firms, eq(firms.id, invitations.firmId))
    .innerJoin(users, eq(users.id, invitations.invitedBy))
    .where(eq(invitations.tokenHash, hashToken(token)))
    .get()
  const pending = usableLink(row, (r) => r.acceptedAt !== null, {
    missing: 'This invitation',
    used: ['invitation_used', 'This invitation has already been accepted. Sign in instead.'],
    expired: [
      'invitation_expired',
      'This invitation has expired. Ask an admin of the firm to invite you again.',
    ],
  })
  return { ...pending, roles: pending.roles as Role[] }
}

/** GET /api/invitations/:token */
export function previewInvitation(db: Db, token: string): InvitationPreview {
  const { email, firmName, roles, invitedByName, expiresAt } = pendingInvitation(db, token)
  return { email, firmName, roles, invitedByName, expiresAt }
}

/**
 * POST /api/invitations/:token/accept: creates the account and the membership and spends the
 * token, in one transaction. A person removed from a firm earlier keeps their user row (their
 * work names them), so accepting a new invitation reuses it with the new name and password.
 * Returns the user id, for the route to start a fresh session.
 */
export async function acceptInvitation(
  db: Db,
  token: string,
  input: { name: string; password: string },
): Promise<string> {
  pendingInvitation(db, token)
  const passwordHash = await hashPassword(input.password)
  return db.transaction(
    (tx) => {
      const invitation = pendingInvitation(tx, token)
      if (existingMembership(tx, invitation.email)) {
        throw conflict(
          `${invitation.email} already has an Ordinate account. Sign in instead.`,
          'already_member',
        )
      }
      const now = Date.now()
      const formerUser = tx
        .select({ id: users.id })
        .from(users)
        .where(eq(users.email, invitation.email))
        .get()
      const userId = formerUser?.id ?? newId()
      if (formerUser) {
        tx.update(users).set({ name: input.name, passwordHash }).where(eq(users.id, userId)).run()
      } else {
        tx.insert(users).values({ id: userId, email: invitation.email, name: input.name, passwordHash }).run()
      }
      const membershipId = newId()
      tx.insert(memberships)
        .values({ id: membershipId, firmId: invitation.firmId, userId, roles: invitation.roles })
        .run()
      tx.update(invitations).set({ acceptedAt: now }).where(eq(invitations.id, invitation.id)).run()
      recordAudit(tx, {
        firmId: invitation.firmId,
        userId,
        action: 'invitation.accepted',
        subjectType: 'invitation',
        subjectId: invitation.id,
        detail: { email: invitation.email, roles: invitation.roles, membershipId },
      })
      return userId
    },
    { behavior: 'immediate' },
  )
}
