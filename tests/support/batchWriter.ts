import { parentPort, workerData } from 'node:worker_threads'
import { openDb } from '../../server/db/client.js'
import { HttpError } from '../../server/httpError.js'
import type { Member } from '../../server/middleware/auth.js'
import { createRunBatch } from '../../server/services/runBatches.js'
import { createRunBatchBodySchema } from '../../shared/schemas/runBatches.js'

/** What the concurrent-batch test asks of one worker thread. */
export interface BatchWriterTask {
  databasePath: string
  member: Member
  recordIds: string[]
  attempts: number
  /** A start line shared by the writers: each counts itself in and waits for all `writers`. */
  startLine: SharedArrayBuffer
  writers: number
}

export interface BatchWriterOutcome {
  accepted: { id: string; runIds: string[] }[]
  refused: { status: number; code: string; needed?: number; balance?: number }[]
  errors: string[]
}

/**
 * Starts batches through the service on a second connection to the same file, as another
 * server process would, racing the other writers for the same credits.
 */
const task = workerData as BatchWriterTask
const db = openDb(task.databasePath)
const arrived = new Int32Array(task.startLine)
Atomics.add(arrived, 0, 1)
Atomics.notify(arrived, 0)
for (let seen = Atomics.load(arrived, 0); seen < task.writers; seen = Atomics.load(arrived, 0)) {
  Atomics.wait(arrived, 0, seen, 100)
}
const outcome: BatchWriterOutcome = { accepted: [], refused: [], errors: [] }
const body = createRunBatchBodySchema.parse({ recordIds: task.recordIds, periodsS: [0.5] })
for (let i = 0; i < task.attempts; i++) {
  try {
    outcome.accepted.push(createRunBatch(db, task.member, body))
  } catch (err) {
    if (err instanceof HttpError) {
      outcome.refused.push({ status: err.status, code: err.code, ...err.extra })
    } else {
      outcome.errors.push((err as { code?: string }).code ?? String(err))
    }
  }
}
db.$client.close()
parentPort!.postMessage(outcome)
