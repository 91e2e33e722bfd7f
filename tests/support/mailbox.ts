import { and, desc, eq } from 'drizzle-orm'
import type { Db } from '../../server/db/client.js'
import { auditLog, mailOutbox } from '../../server/db/schema.js'

/** The newest queued or sent message to an address, straight from the outbox. */
export function latestMailTo(db: Db, to: string) {
  return db
    .select()
    .from(mailOutbox)
    .where(eq(mailOutbox.toAddress, to))
    .orderBy(desc(mailOutbox.createdAt))
    .all()[0]
}

/** The token of the first link in `text` whose path starts with `prefix` (e.g. '/invitations/'). */
export function tokenFromLink(text: string, prefix: string): string {
  const match = new RegExp(`https?://[^\\s/]+${prefix}([A-Za-z0-9_-]+)`).exec(text)
  if (!match?.[1]) throw new Error(`no ${prefix} link in:\n${text}`)
  return match[1]
}

/** The audit rows with the given action, oldest first. */
export function auditRows(db: Db, action: string, subjectId?: string) {
  return db
    .select()
    .from(auditLog)
    .where(
      subjectId
        ? and(eq(auditLog.action, action), eq(auditLog.subjectId, subjectId))
        : eq(auditLog.action, action),
    )
    .all()
}
