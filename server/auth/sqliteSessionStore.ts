import session from 'express-session'
import type { Db } from '../db/client.js'

const DAY_MS = 24 * 60 * 60 * 1000

/**
 * express-session store on the `sessions` table, through the same better-sqlite3 connection
 * as the rest of the app (synchronous, so every callback runs after the write is durable).
 */
export class SqliteSessionStore extends session.Store {
  private readonly getStmt
  private readonly setStmt
  private readonly destroyStmt
  private readonly touchStmt
  private readonly pruneStmt

  constructor(db: Db) {
    super()
    const c = db.$client
    this.getStmt = c.prepare<[string, number], { data: string }>(
      'SELECT data FROM sessions WHERE sid = ? AND expires_at > ?',
    )
    this.setStmt = c.prepare(
      'INSERT INTO sessions (sid, data, expires_at) VALUES (?, ?, ?) ON CONFLICT(sid) DO UPDATE SET data = excluded.data, expires_at = excluded.expires_at',
    )
    this.destroyStmt = c.prepare('DELETE FROM sessions WHERE sid = ?')
    this.touchStmt = c.prepare('UPDATE sessions SET expires_at = ? WHERE sid = ?')
    this.pruneStmt = c.prepare('DELETE FROM sessions WHERE expires_at <= ?')
  }

  private static expiry(sess: session.SessionData): number {
    const expires = sess.cookie?.expires
    return expires ? new Date(expires).getTime() : Date.now() + DAY_MS
  }

  override get(sid: string, cb: (err: unknown, session?: session.SessionData | null) => void): void {
    try {
      const row = this.getStmt.get(sid, Date.now())
      cb(null, row ? (JSON.parse(row.data) as session.SessionData) : null)
    } catch (err) {
      cb(err)
    }
  }

  override set(sid: string, sess: session.SessionData, cb?: (err?: unknown) => void): void {
    try {
      this.setStmt.run(sid, JSON.stringify(sess), SqliteSessionStore.expiry(sess))
      cb?.()
    } catch (err) {
      cb?.(err)
    }
  }

  override destroy(sid: string, cb?: (err?: unknown) => void): void {
    try {
      this.destroyStmt.run(sid)
      cb?.()
    } catch (err) {
      cb?.(err)
    }
  }

  override touch(sid: string, sess: session.SessionData, cb?: (err?: unknown) => void): void {
    try {
      this.touchStmt.run(SqliteSessionStore.expiry(sess), sid)
      cb?.()
    } catch (err) {
      cb?.(err)
    }
  }

  /** Deletes expired sessions; called on an interval by the server. */
  prune(): number {
    return this.pruneStmt.run(Date.now()).changes
  }
}
