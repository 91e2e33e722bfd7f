import type { Db } from '../db/client.js'

/**
 * Ends every stored session of a user (after a password reset or when they leave the firm).
 * Sessions are express-session JSON in the sessions table; the user id sits at $.userId.
 */
export function endSessionsOfUser(db: Db, userId: string): number {
  return db.$client.prepare("DELETE FROM sessions WHERE json_extract(data, '$.userId') = ?").run(userId)
    .changes
}
