import type { NextFunction, Request, Response } from 'express'
import { eq } from 'drizzle-orm'
import { type Action, may, refusalFor } from '../../shared/permissions.js'
import type { Role } from '../../shared/schemas/accounts.js'
import type { Db } from '../db/client.js'
import { firms, memberships, users } from '../db/schema.js'
import { forbidden, unauthorized } from '../httpError.js'

/** The signed-in member, as every service sees them. Firm scoping uses `firmId`. */
export interface Member {
  userId: string
  email: string
  name: string
  firmId: string
  firmName: string
  membershipId: string
  roles: Role[]
}

declare module 'express-serve-static-core' {
  interface Request {
    member?: Member
  }
}

export function findMember(db: Db, userId: string): Member | undefined {
  const row = db
    .select({
      userId: users.id,
      email: users.email,
      name: users.name,
      firmId: firms.id,
      firmName: firms.name,
      membershipId: memberships.id,
      roles: memberships.roles,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .innerJoin(firms, eq(firms.id, memberships.firmId))
    .where(eq(memberships.userId, userId))
    .get()
  return row ? { ...row, roles: row.roles as Role[] } : undefined
}

/** Loads req.member from the session, if any; never rejects. */
export function loadMember(db: Db) {
  return (req: Request, _res: Response, next: NextFunction) => {
    const userId = req.session?.userId
    if (userId) req.member = findMember(db, userId)
    next()
  }
}

/** Rejects signed-out requests with 401. */
export function requireMember(req: Request, _res: Response, next: NextFunction) {
  if (!req.member) return next(unauthorized())
  next()
}

/** Allows members who may take `action` (shared/permissions.ts); others get 403 naming the roles it needs. */
export function requireAction(action: Action) {
  return (req: Request, _res: Response, next: NextFunction) => {
    if (!req.member) return next(unauthorized())
    if (!may(req.member.roles, action)) return next(forbidden(refusalFor(action)))
    next()
  }
}

/** The member of a request that passed requireMember. */
export function memberOf(req: Request): Member {
  if (!req.member) throw unauthorized()
  return req.member
}
