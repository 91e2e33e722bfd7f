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
