import { createHash } from 'node:crypto'
import type { Db } from '../../server/db/client.js'

/**
 * A digest of every row of every table, to show that a refused request wrote nothing. The
 * sessions table is left out: rolling sessions refresh their expiry on every request.
 */
export function snapshotDb(db: Db): Record<string, string> {
  const tables = db.$client
    .prepare(
      "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' AND name <> 'sessions' ORDER BY name",
    )
    .all() as { name: string }[]
  const out: Record<string, string> = {}
  for (const { name } of tables) {
    const rows = db.$client.prepare(`SELECT * FROM "${name}" ORDER BY rowid`).all()
    const text = JSON.stringify(rows, (_k, v: unknown) => (Buffer.isBuffer(v) ? v.toString('hex') : v))
    out[name] = `${rows.length}:${createHash('sha256').update(text).digest('hex').slice(0, 16)}`
  }
  return out
}
