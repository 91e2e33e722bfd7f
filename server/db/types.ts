import type Database from 'better-sqlite3'
import type { ExtractTablesWithRelations } from 'drizzle-orm'
import type { BetterSQLite3Database } from 'drizzle-orm/better-sqlite3'
import type { BaseSQLiteDatabase } from 'drizzle-orm/sqlite-core'
import type * as schema from './schema.js'

/** The open database (openDb), with its better-sqlite3 connection for raw statements and backups. */
export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database }

/**
 * The database or a transaction open in it: what a query that may run inside a caller's
 * transaction takes (`db.transaction((tx) => …)` hands one, and a `Db` is one too).
 */
export type Tx = BaseSQLiteDatabase<
  'sync',
  Database.RunResult,
  typeof schema,
  ExtractTablesWithRelations<typeof schema>
>
