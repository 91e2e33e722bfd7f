import { and, eq, isNull } from 'drizzle-orm'
import type { Db } from '../db/client.js'
import { passwordResets, users } from '../db/schema.js'
import { newId } from '../ids.js'
import { appLink } from '../mail/links.js'
import { passwordResetMail } from '../mail/templates.js'
import { findMember } from '../middleware/auth.js'
import { recordAudit } from './audit.js'
import { hashPassword } from './auth.js'
import { enqueueMail } from './mail.js'
import { endSessionsOfUser } from './sessions.js'
import { hashToken, newToken, usableLink } from './tokens.js'

/** Reset links expire one hour after they are sent. */
export const PASSWORD_RESET_TTL_MS = 60 * 60 * 1000

type Tx = Parameters<Parameters<Db['transaction']>[0]>[0]

/**
 * POST /api/auth/password-reset: queues a reset link when the address belongs to a member of a
 * firm, and does nothing otherwise. The caller answers the same either way.
 */
export function requestPasswordReset(db: Db, email: string, origin: string): void {
  const user = db.select({ id: users.id }).from(users).where(eq(users.email, email)).get()
  const member = user ? findMember(db, user.id) : undefined
  if (!member) return
  const { token, tokenHash } = newToken()
  const now = Date.now()
  const id = newId()
  const expiresAt = now + PASSWORD_RESET_TTL_MS
  db.transaction(
    (tx) => {
      tx.insert(passwordResets)
        .values({ id, userId: member.userId, tokenHash, expiresAt, createdAt: now })
        .run()
      enqueueMail(tx, {
        to: member.email,
        ...passwordResetMail({
          name: member.name,
          url: appLink(origin, `/reset-password/${token}`),
          expiresAt,
        }),
      })
      recordAudit(tx, {
        firmId: member.firmId,
        userId: member.userId,
        action: 'auth.password_reset_requested',
        subjectType: 'password_reset',
        subjectId: id,
      })
    },
    { behavior: 'immediate' },
  )
}

/** The reset a token opens, still usable; an unknown token is 404, a spent or expired one 410. */
function usableReset(db: Db | Tx, token: string) {
  const row = db
    .select()
    .from(passwordResets)
    .where(eq(passwordResets.tokenHash, hashToken(token)))
    .get()
  return usableLink(row, (r) => r.usedAt !== null, {
    missing: 'This reset link',
    used: ['reset_used', 'This reset link has already been used. Ask for a new one.'],
    expired: ['reset_expired', 'This reset link has expired. Ask for a new one.'],
  })
}

/**
 * POST /api/auth/password-reset/:token: sets the new password, spends this and every other
 * outstanding reset link of the user, and signs the user out everywhere.
 */
export async function completePasswordReset(db: Db, token: string, password: string): Promise<void> {
  usableReset(db, token)
  const passwordHash = await hashPassword(password)
  db.transaction(
    (tx) => {
      const reset = usableReset(tx, token)
      const now = Date.now()
      tx.update(users).set({ passwordHash }).where(eq(users.id, reset.userId)).run()
      tx.update(passwordResets)
        .set({ usedAt: now })
        .where(and(eq(passwordResets.userId, reset.userId), isNull(passwordResets.usedAt)))
        .run()
      endSessionsOfUser(db, reset.userId)
      const member = findMember(db, reset.userId)
      recordAudit(tx, {
        firmId: member?.firmId,
        userId: reset.userId,
        action: 'auth.password_reset',
        subjectType: 'password_reset',
        subjectId: reset.id,
      })
    },
    { behavior: 'immediate' },
  )
}
