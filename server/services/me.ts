import { eq } from 'drizzle-orm'
import type { Me, UnitSystem, UpdateMeBody } from '../../shared/schemas/me.js'
import type { Db, Tx } from '../db/client.js'
import { memberships } from '../db/schema.js'
import type { Member } from '../middleware/auth.js'
import { recordAudit } from './audit.js'
import { toSessionInfo } from './auth.js'

/** The member's units preference (SI until they choose otherwise). */
export function memberUnits(db: Tx, member: Pick<Member, 'membershipId'>): UnitSystem {
  const row = db
    .select({ units: memberships.units })
    .from(memberships)
    .where(eq(memberships.id, member.membershipId))
    .get()
  return row?.units ?? 'si'
}

/**
 * The units a file (CSV or sheet) is written in: `?units=` when the request gives it,
 * otherwise the member's preference.
 */
export function fileUnits(db: Tx, member: Pick<Member, 'membershipId'>, requested?: UnitSystem): UnitSystem {
  return requested ?? memberUnits(db, member)
}

/** GET /api/me */
export function getMe(db: Db, member: Member): Me {
  return { ...toSessionInfo(member), units: memberUnits(db, member) }
}

/** PATCH /api/me: the member's own preferences. */
export function updateMe(db: Db, member: Member, body: UpdateMeBody): Me {
  db.transaction((tx) => {
    const before = memberUnits(tx, member)
    if (before === body.units) return
    tx.update(memberships).set({ units: body.units }).where(eq(memberships.id, member.membershipId)).run()
    recordAudit(tx, {
      firmId: member.firmId,
      userId: member.userId,
      action: 'member.units_changed',
      subjectType: 'membership',
      subjectId: member.membershipId,
      detail: { from: before, to: body.units },
    })
  })
  return getMe(db, member)
}
