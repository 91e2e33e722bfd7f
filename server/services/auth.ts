import bcrypt from 'bcryptjs'
import { eq } from 'drizzle-orm'
import type { SessionInfo } from '../../shared/schemas/accounts.js'
import type { Db } from '../db/client.js'
import { users } from '../db/schema.js'
import { unauthorized } from '../httpError.js'
import { findMember, type Member } from '../middleware/auth.js'
import { recordAudit } from './audit.js'

/** bcrypt cost 12: about 0.25 s per hash in pure JS here; OWASP's password storage sheet asks for ≥ 10. */
export const BCRYPT_COST = 12

export function hashPassword(password: string, cost = BCRYPT_COST): Promise<string> {
  return bcrypt.hash(password, cost)
}

let dummyHash: Promise<string> | undefined
/**
 * A real hash to compare against when the e-mail is unknown. It has the members' cost, so both
 * paths take the same time and the answer's timing does not tell which addresses have accounts.
 * Made on first use, to keep start-up fast.
 */
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashPassword('not-a-real-password-ordinate')
  return dummyHash
}

export function toSessionInfo(member: Member): SessionInfo {
  return {
    user: { id: member.userId, email: member.email, name: member.name },
    firm: { id: member.firmId, name: member.firmName },
    roles: member.roles,
  }
}

/** Checks credentials; returns the member or throws 401 with a message that does not reveal which part was wrong. */
export async function verifyCredentials(db: Db, email: string, password: string): Promise<Member> {
  const user = db.select().from(users).where(eq(users.email, email)).get()
  const ok = await bcrypt.compare(password, user?.passwordHash ?? (await dummyPasswordHash()))
  const member = user && ok ? findMember(db, user.id) : undefined
  if (!member) {
    recordAudit(db, { userId: user?.id, action: 'auth.sign_in_failed', detail: { email } })
    throw unauthorized('The e-mail address or password is not correct.')
  }
  recordAudit(db, { firmId: member.firmId, userId: member.userId, action: 'auth.signed_in' })
  return member
}
