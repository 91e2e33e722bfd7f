import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import Database from 'better-sqlite3'
import { startServer, type RunningServer } from '../e2e/harness.js'

export interface BenchServer {
  server: RunningServer
  databasePath: string
  /** Adds one grant row of `credits` to the ledger of the firm that owns `recordId`. */
  grantCredits: (recordId: string, credits: number) => void
  /** Stops the server and removes its folder. */
  stop: () => Promise<void>
}

/**
 * The built server for a benchmark: production mode with the demo data, on a fresh folder
 * whose SQLite file the benchmark may read and write beside the server.
 */
export async function startBenchServer(env: Record<string, string> = {}): Promise<BenchServer> {
  const dir = mkdtempSync(path.join(tmpdir(), 'ordinate-bench-'))
  const databasePath = path.join(dir, 'ordinate.sqlite')
  const server = await startServer({
    NODE_ENV: 'production',
    DEMO_DATA: '1',
    DATA_DIR: dir,
    DATABASE_PATH: databasePath,
    ...env,
  })
  return {
    server,
    databasePath,
    grantCredits(recordId, credits) {
      const db = new Database(databasePath)
      try {
        db.pragma('busy_timeout = 5000')
        db.prepare(
          `insert into credit_ledger (firm_id, delta, kind, note, created_at)
           select firm_id, ?, 'grant', 'benchmark', ? from records where id = ?`,
        ).run(credits, Date.now(), recordId)
      } finally {
        db.close()
      }
    },
    async stop() {
      await server.stop()
      rmSync(dir, { recursive: true, force: true })
    },
  }
}
