import { randomBytes } from 'node:crypto'
import { and, desc, eq, isNull } from 'drizzle-orm'
import type { Role } from '../../shared/schemas/accounts.js'
import {
  API_TOKEN_PREFIX,
  type ApiToken,
  type CreateApiTokenBody,
  type CreatedApiToken,
  type FirmApiToken,
} from '../../shared/schemas/apiTokens.js'
import type { Db } from '../db/client.js'
import { apiTokens, memberships, users } from '../db/schema.js'
import { badRequest, notFound } from '../httpError.js'
import { newId } from '../ids.js'
import { findMember, type Member } from '../middleware/auth.js'
import { recordAudit } from './audit.js'
import { hashToken } from './tokens.js'

/** Characters of the secret kept in clear for lists (prefix plus four): far too few to guess the rest from. */
const HINT_LENGTH = API_TOKEN_PREFIX.length + 4

const tokenColumns = {
  id: apiTokens.id,
  name: apiTokens.name,
  roles: apiTokens.roles,
  hint: apiTokens.hint,
  createdAt: apiTokens.createdAt,
  expiresAt: apiTokens.expiresAt,
  lastUsedAt: apiTokens.lastUsedAt,
}

const toApiToken = <T extends { roles: string[] }>(row: T) => ({ ...row, roles: row.roles as Role[] })

/**
 * POST /api/me/tokens: a personal token holding at most the member's roles (all of them by
 * default), with an optional expiry. The secret (32 random bytes, base64url, after the prefix)
 * is answered once; only its SHA-256 is stored.
 */
export function createApiToken(db: Db, member: Member, body: CreateApiTokenBody): CreatedApiToken {
  const roles = body.roles ?? member.roles
  const extra = roles.filter((r) => !member.roles.includes(r))
  if (extra.length > 0) {
    throw badRequest(
      `roles: a token can hold only your own roles (${member.roles.join(', ')}), not ${extra.join(', ')}.`,
      'token_roles_exceed_member',
    )
  }
  const now = Date.now()
  if (body.expiresAt !== undefined && body.expiresAt <= now) {
    throw badRequest('expiresAt: the expiry must lie in the future.', 'token_expiry_past')
  }
  const token = `${API_TOKEN_PREFIX}${randomBytes(32).toString('base64url')}`
  const row = {
    id: newId(),
    name: body.name,
    roles: [...roles],
    hint: token.slice(0, HINT_LENGTH),
    createdAt: now,
    expiresAt: body.expiresAt ?? null,
    lastUsedAt: null,
  }
  db.transaction((tx) => {
    tx.insert(apiTokens)
      .values({
        ...row,
        firmId: member.firmId,
        userId: member.userId,
        membershipId: member.membershipId,
        tokenHash: hashToken(token),
      })
      .run()
    recordAudit(tx, {
      firmId: member.firmId,
      userId: member.userId,
      action: 'api_token.created',
      subjectType: 'api_token',
      subjectId: row.id,
      detail: { name: row.name, roles: row.roles, expiresAt: row.expiresAt },
    })
  })
  return { ...toApiToken(row), token }
}

/** GET /api/me/tokens: the member's tokens not revoked (expired ones too, marked by expiresAt), newest first. */
export function listMyTokens(db: Db, member: Member): ApiToken[] {
  return db
    .select(tokenColumns)
    .from(apiTokens)
    .where(and(eq(apiTokens.membershipId, member.membershipId), isNull(apiTokens.revokedAt)))
    .orderBy(desc(apiTokens.createdAt))
    .all()
    .map(toApiToken)
}

/** GET /api/firm/tokens (admins): every live member's tokens not revoked, with their owners. */
export function listFirmTokens(db: Db, admin: Member): FirmApiToken[] {
  return db
    .select({ ...tokenColumns, ownerId: users.id, ownerName: users.name, ownerEmail: users.email })
    .from(apiTokens)
    .innerJoin(memberships, eq(memberships.id, apiTokens.membershipId))
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(and(eq(apiTokens.firmId, admin.firmId), isNull(apiTokens.revokedAt)))
    .orderBy(desc(apiTokens.createdAt))
    .all()
    .map(({ ownerId, ownerName, ownerEmail, ...row }) => ({
      ...toApiToken(row),
      owner: { id: ownerId, name: ownerName, email: ownerEmail },
    }))
}

/**
 * Revokes a token: the member's own (DELETE /api/me/tokens/:id) or, for an admin, any of the
 * firm's (DELETE /api/firm/tokens/:id). Another member's or firm's token, or one already
 * revoked, answers 404.
 */
export function revokeApiToken(db: Db, actor: Member, tokenId: string, scope: 'own' | 'firm'): void {
  db.transaction(
    (tx) => {
      const owned =
        scope === 'own' ? eq(apiTokens.membershipId, actor.membershipId) : eq(apiTokens.firmId, actor.firmId)
      const token = tx
        .select({ id: apiTokens.id, name: apiTokens.name, userId: apiTokens.userId })
        .from(apiTokens)
        .where(and(eq(apiTokens.id, tokenId), owned, isNull(apiTokens.revokedAt)))
        .get()
      if (!token) throw notFound('That API token')
      tx.update(apiTokens)
        .set({ revokedAt: Date.now(), revokedBy: actor.userId })
        .where(eq(apiTokens.id, token.id))
        .run()
      recordAudit(tx, {
        firmId: actor.firmId,
        userId: actor.userId,
        action: 'api_token.revoked',
        subjectType: 'api_token',
        subjectId: token.id,
        detail: { name: token.name, ownerId: token.userId },
      })
    },
    { behavior: 'immediate' },
  )
}

/**
 * The member a bearer token speaks for, or undefined when it is unknown, revoked, expired, or
 * its member has left the firm (a re-invited person has a new membership, so old tokens stay
 * dead). The token's roles are cut to the member's current ones, so demoting a member demotes
 * their tokens. Records the time of use.
 */
export function authenticateApiToken(
  db: Db,
  secret: string,
  now = Date.now(),
): { member: Member; tokenId: string } | undefined {
  if (!secret.startsWith(API_TOKEN_PREFIX)) return undefined
  const token = db
    .select({
      id: apiTokens.id,
      userId: apiTokens.userId,
      firmId: apiTokens.firmId,
      membershipId: apiTokens.membershipId,
      roles: apiTokens.roles,
      expiresAt: apiTokens.expiresAt,
    })
    .from(apiTokens)
    .where(and(eq(apiTokens.tokenHash, hashToken(secret)), isNull(apiTokens.revokedAt)))
    .get()
  if (!token || (token.expiresAt !== null && token.expiresAt <= now)) return undefined
  const member = findMember(db, token.userId)
  if (!member || member.membershipId !== token.membershipId || member.firmId !== token.firmId)
    return undefined
  db.update(apiTokens).set({ lastUsedAt: now }).where(eq(apiTokens.id, token.id)).run()
  return {
    member: { ...member, roles: member.roles.filter((r) => token.roles.includes(r)) },
    tokenId: token.id,
  }
}
