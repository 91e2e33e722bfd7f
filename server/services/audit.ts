import type { Tx } from '../db/client.js'
import { auditLog } from '../db/schema.js'

export interface AuditEntry {
  firmId?: string | null
  userId?: string | null
  action: string
  subjectType?: string
  subjectId?: string
  detail?: Record<string, unknown>
}

/** Appends to the audit log. Callers inside a transaction pass the transaction as `db`. */
export function recordAudit(db: Tx, entry: AuditEntry): void {
  db.insert(auditLog)
    .values({
      firmId: entry.firmId ?? null,
      userId: entry.userId ?? null,
      action: entry.action,
      subjectType: entry.subjectType,
      subjectId: entry.subjectId,
      detail: entry.detail,
      createdAt: Date.now(),
    })
    .run()
}

/** A member's action on one subject of their firm: the audit row most services write. */
export function auditAction(
  db: Tx,
  member: { firmId: string; userId: string },
  action: string,
  subject: { type: string; id: string },
  detail?: Record<string, unknown>,
): void {
  recordAudit(db, {
    firmId: member.firmId,
    userId: member.userId,
    action,
    subjectType: subject.type,
    subjectId: subject.id,
    detail,
  })
}
