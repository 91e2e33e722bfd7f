import { mkdirSync } from 'node:fs'
import path from 'node:path'
import Database from 'better-sqlite3'
import { drizzle } from 'drizzle-orm/better-sqlite3'
import { migrate } from 'drizzle-orm/better-sqlite3/migrator'
import { projectRoot } from '../projectRoot.js'
import * as schema from './schema.js'
import type { Db } from './types.js'

export type { Db, Tx } from './types.js'

/**
 * Opens the SQLite file with the settings every connection needs: foreign keys on (SQLite
 * leaves them off by default), WAL so readers never block the writer, and a busy timeout so
 * concurrent writers wait instead of failing with SQLITE_BUSY.
 */
export function openDb(filePath: string): Db {
  if (filePath !== ':memory:') mkdirSync(path.dirname(path.resolve(filePath)), { recursive: true })
  const sqlite = new Database(filePath)
  sqlite.pragma('journal_mode = WAL')
  sqlite.pragma('foreign_keys = ON')
  sqlite.pragma('busy_timeout = 5000')
  sqlite.pragma('synchronous = NORMAL')
  return drizzle(sqlite, { schema }) as Db
}

/** Applies the generated migrations in drizzle/. */
export function migrateDb(db: Db): void {
  migrate(db, { migrationsFolder: path.join(projectRoot(), 'drizzle') })
}
