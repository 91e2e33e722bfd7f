import { parentPort, workerData } from 'node:worker_threads'
import { openDb } from '../../server/db/client.js'
import type { Member } from '../../server/middleware/auth.js'
import { appendLedger } from '../../server/services/credits.js'
import { addReviewComment } from '../../server/services/reviews.js'

/** What the concurrent-writer test asks of one worker thread. */
export interface WriterTask {
  databasePath: string
  writer: number
  writes: number
  member: Member
  reviewId: string
  /** Overrides the connection's busy timeout (the control case sets 0). */
  busyTimeoutMs?: number
  /** A start line shared by the writers: each counts itself in and waits for all `writers`. */
  startLine: SharedArrayBuffer
  writers: number
}

/**
 * Writes through the app's own services on a second connection to the same file, as another
 * process would: ledger rows in IMMEDIATE transactions and review comments (a read, then a
 * write), alternately. Reports the SQLite error codes it met.
 */
const task = workerData as WriterTask
const db = openDb(task.databasePath)
if (task.busyTimeoutMs !== undefined) db.$client.pragma(`busy_timeout = ${task.busyTimeoutMs}`)
// Start together, so the writers overlap however long each thread took to load.
const arrived = new Int32Array(task.startLine)
Atomics.add(arrived, 0, 1)
Atomics.notify(arrived, 0)
for (let seen = Atomics.load(arrived, 0); seen < task.writers; seen = Atomics.load(arrived, 0)) {
  Atomics.wait(arrived, 0, seen, 100)
}
const errors: string[] = []
let done = 0
for (let i = 0; i < task.writes; i++) {
  try {
    if (i % 2 === 0) {
      db.transaction(
        (tx) =>
          appendLedger(tx, {
            firmId: task.member.firmId,
            delta: 1,
            kind: 'grant',
            note: `writer ${task.writer} #${i}`,
          }),
        {
          behavior: 'immediate',
        },
      )
    } else {
      addReviewComment(db, task.member, task.reviewId, { body: `Writer ${task.writer}, comment ${i}.` })
    }
    done++
  } catch (err) {
    errors.push((err as { code?: string }).code ?? String(err))
  }
}
db.$client.close()
parentPort!.postMessage({ done, errors })
