import { createHash } from 'node:crypto'
import { eq } from 'drizzle-orm'
import { isFinished, type RunStatus } from '../../shared/schemas/runs.js'
import { recordParameters } from '../../shared/spectra/recordParameters.js'
import type { Db } from '../../server/db/client.js'
import { records, runs, users } from '../../server/db/schema.js'
import { newId } from '../../server/ids.js'
import { RunQueue, type RunQueueOptions } from '../../server/runs/runQueue.js'
import type { RunScheduler } from '../../server/runs/runScheduler.js'
import { appendLedger, creditBalance } from '../../server/services/credits.js'
import type { DemoSeed } from '../../server/services/demoData.js'
import { encodeSamples } from '../../server/services/sampleBlob.js'
import type { TestContext } from './testApp.js'

/**
 * A synthetic, deterministic ground motion (m/s²) for tests: three decaying sines of
 * 0.8, 2.5 and 7 Hz under a smooth envelope. Labelled synthetic wherever it is stored.
 */
export function syntheticMotion(points: number, dtS: number): Float64Array {
  const out = new Float64Array(points)
  const durationS = (points - 1) * dtS
  for (let i = 0; i < points; i++) {
    const t = i * dtS
    const envelope = Math.sin((Math.PI * t) / durationS) ** 2
    out[i] =
      envelope *
      (1.2 * Math.sin(2 * Math.PI * 0.8 * t) +
        0.9 * Math.sin(2 * Math.PI * 2.5 * t + 0.4) +
        0.5 * Math.sin(2 * Math.PI * 7 * t + 1.1))
  }
  return out
}

export interface InsertedRecord {
  id: string
  sha256: string
  samples: Float64Array
  dtS: number
}

/** Who owns a record the demo engineer uploads: the first demo firm and its first project. */
export function engineerUpload(seed: DemoSeed): { firmId: string; projectId: string; uploadedBy: string } {
  return {
    firmId: seed.firmIds[0]!,
    projectId: seed.projectIds[0]!,
    uploadedBy: seed.userIds['engineer@ordinate.test']!,
  }
}

/** Inserts a records row directly (samples as little-endian Float64), as the records service stores it. */
export function insertRecord(
  db: Db,
  owner: { firmId: string; projectId: string; uploadedBy: string },
  options: { name?: string; points?: number; dtS?: number; samples?: Float64Array } = {},
): InsertedRecord {
  const dtS = options.dtS ?? 0.01
  const samples = options.samples ?? syntheticMotion(options.points ?? 1500, dtS)
  const blob = encodeSamples(samples)
  const sha256 = createHash('sha256').update(blob).digest('hex')
  const p = recordParameters(samples, dtS)
  const id = newId()
  db.insert(records)
    .values({
      id,
      ...owner,
      name: options.name ?? 'Synthetic test motion',
      sourceFileName: 'synthetic-test-motion.txt',
      sha256,
      format: 'single-column',
      sourceUnits: 'm/s2',
      points: p.points,
      dtS,
      durationS: p.durationS,
      pgaMPerS2: p.pgaMPerS2,
      pgvMPerS: p.pgvMPerS,
      pgdM: p.pgdM,
      ariasMPerS: p.ariasMPerS,
      d595S: p.d595S,
      cavMPerS: p.cavMPerS,
      warnings: [],
      samples: blob,
      synthetic: true,
    })
    .run()
  return { id, sha256, samples, dtS }
}

/** Sets a firm's balance to exactly `credits` with one grant (or debit) row. */
export function setCredits(db: Db, firmId: string, credits: number): void {
  const delta = credits - creditBalance(db, firmId)
  if (delta !== 0) appendLedger(db, { firmId, delta, kind: 'grant', note: 'test balance' })
}

export function userIdOf(db: Db, email: string): string {
  const row = db.select({ id: users.id }).from(users).where(eq(users.email, email)).get()
  if (!row) throw new Error(`no user ${email}`)
  return row.id
}

/** A small job: 12 periods, 2 damping ratios. */
export const SMALL_JOB = {
  dampingRatios: [0.05, 0.1],
  periodsS: [0.05, 0.1, 0.2, 0.3, 0.5, 0.7, 1, 1.5, 2, 3, 4, 5],
}

/** Resolves with the run's final status and error, whether it ends before or after the call. */
export function runFinished(
  queue: Pick<RunScheduler, 'subscribe'>,
  db: Db,
  runId: string,
): Promise<{ status: RunStatus; error: string | null }> {
  return new Promise((resolve) => {
    const off = queue.subscribe(runId, (event) => {
      if (event.type === 'status' && isFinished(event.status)) {
        off()
        resolve(event)
      }
    })
    const row = db
      .select({ status: runs.status, error: runs.error })
      .from(runs)
      .where(eq(runs.id, runId))
      .get()
    if (row && isFinished(row.status)) {
      off()
      resolve(row)
    }
  })
}

/** Gives a test context's app a run queue of its own, on real worker threads, started. */
export function startRunQueue(ctx: TestContext, options: Omit<RunQueueOptions, 'db'>): RunQueue {
  const queue = new RunQueue({ db: ctx.db, ...options })
  ctx.deps.runQueue = queue
  queue.start()
  return queue
}
