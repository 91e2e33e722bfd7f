/**
 * The run queue on a fresh database: runs are created with the runs service (the API tests in
 * tests/api/runs.test.ts cover the HTTP side), computed on real worker threads.
 */
import { and, count, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { creditLedger, memberships, records, runs, spectra } from '../db/schema.js'
import type { Member } from '../middleware/auth.js'
import { creditBalance } from '../services/credits.js'
import { createRun, getRun } from '../services/runs.js'
import { encodeSamples } from '../services/sampleBlob.js'
import { runRequestSchema } from '../../shared/schemas/runs.js'
import {
  insertRecord,
  runFinished,
  setCredits,
  SMALL_JOB,
  syntheticMotion,
  type InsertedRecord,
} from '../../tests/support/runFixtures.js'
import { createTestContext, type TestContext } from '../../tests/support/testApp.js'
import { RunQueue } from './runQueue.js'

let ctx: TestContext
let queue: RunQueue
let engineer: Member
let record: InsertedRecord
let firmId: string
let projectId: string

/** Tests that compute several long jobs one after another allow for a machine shared with other work. */
const LONG_JOB_TIMEOUT_MS = 180_000

/** The demo member of a test context, as the auth middleware hands it to a service. */
function memberOf(context: TestContext, email: string): Member {
  const userId = context.seed.userIds[email]!
  const membership = context.db.select().from(memberships).where(eq(memberships.userId, userId)).get()!
  return {
    userId,
    email,
    name: email,
    firmId: membership.firmId,
    firmName: '',
    membershipId: membership.id,
    roles: membership.roles as Member['roles'],
  }
}

/** Creates a run as the engineer (as POST /api/runs does) and tells the queue. */
async function post(body: Record<string, unknown>) {
  const run = createRun(ctx.db, engineer, runRequestSchema.parse(body))
  queue.kick()
  return Promise.resolve({ body: run })
}

/** Resolves at the run's first progress event. */
function firstProgress(q: RunQueue, runId: string): Promise<void> {
  return new Promise((resolve) => {
    const off = q.subscribe(runId, (event) => {
      if (event.type === 'progress') {
        off()
        resolve()
      }
    })
  })
}

const ledgerRows = (db: TestContext['db'], runId: string) =>
  db
    .select({ kind: creditLedger.kind, delta: creditLedger.delta })
    .from(creditLedger)
    .where(eq(creditLedger.runId, runId))
    .all()

beforeAll(async () => {
  ctx = await createTestContext()
  queue = new RunQueue({ db: ctx.db, workerCount: 2, runTimeLimitS: 60, idleMs: 5000 })
  queue.start()
  firmId = ctx.seed.firmIds[0]!
  projectId = ctx.seed.projectIds[0]!
  engineer = memberOf(ctx, 'engineer@ordinate.test')
  record = insertRecord(ctx.db, { firmId, projectId, uploadedBy: engineer.userId })
  setCredits(ctx.db, firmId, 500)
})
afterAll(async () => {
  await queue.stop(0)
  ctx.close()
})

/** Replaces the shared queue with a fresh one on the same database (as a server restart does). */
function restartSharedQueue() {
  queue = new RunQueue({ db: ctx.db, workerCount: 2, runTimeLimitS: 60, idleMs: 5000 })
  queue.start()
}

/**
 * Runs `body` with a queue of its own in place of the shared one (stopped first, so it claims
 * nothing meanwhile); the test starts it when its runs are created.
 */
async function withOwnQueue(
  options: { workerCount: number; runTimeLimitS?: number; idleMs?: number },
  body: (own: RunQueue) => Promise<void>,
) {
  await queue.stop(0)
  const own = new RunQueue({ db: ctx.db, runTimeLimitS: 170, idleMs: 5000, ...options })
  try {
    await body(own)
  } finally {
    await own.stop(0)
    restartSharedQueue()
  }
}

describe('RunQueue', () => {
  /** A long job: 2,000 periods and 10 damping ratios on a 6,000-point record. */
  let longRecord: InsertedRecord
  const LONG = {
    dampingRatios: [0, 0.01, 0.02, 0.03, 0.05, 0.07, 0.1, 0.15, 0.2, 0.3],
    periodGrid: { minS: 0.01, maxS: 20, count: 2000 },
  }
  beforeAll(() => {
    longRecord = insertRecord(
      ctx.db,
      { firmId, projectId, uploadedBy: ctx.seed.userIds['engineer@ordinate.test']! },
      { name: 'Long synthetic motion', points: 6000, dtS: 0.005 },
    )
  })

  /** A record with one stored sample that is not a finite number: the engine's input check throws in the worker. */
  function insertBrokenRecord(options: Parameters<typeof insertRecord>[2], nanAt: number): InsertedRecord {
    const broken = insertRecord(
      ctx.db,
      { firmId, projectId, uploadedBy: ctx.seed.userIds['engineer@ordinate.test']! },
      options,
    )
    const samples = Float64Array.from(broken.samples)
    samples[nanAt] = Number.NaN
    ctx.db
      .update(records)
      .set({ samples: encodeSamples(samples) })
      .where(eq(records.id, broken.id))
      .run()
    return broken
  }

  /** Posts a run the engine refuses: it fails once, with the engine's message, and its credit comes back. */
  async function expectEngineRefusal(body: Record<string, unknown>) {
    const res = await post(body)
    expect(await runFinished(queue, ctx.db, res.body.id)).toMatchObject({
      status: 'failed',
      error: 'The computation failed: the record holds a value that is not a finite number',
    })
    expect(ledgerRows(ctx.db, res.body.id).map((r) => r.kind)).toEqual(['run_reserved', 'run_returned'])
  }

  it("fails a run the engine refuses, with the engine's message, and returns its credit", async () => {
    const broken = insertBrokenRecord({ points: 300 }, 10)
    await expectEngineRefusal({ recordId: broken.id, ...SMALL_JOB })
    // The thread that reported the error is still there for the next run.
    expect(
      await runFinished(queue, ctx.db, (await post({ recordId: record.id, ...SMALL_JOB })).body.id),
    ).toMatchObject({ status: 'succeeded' })
  })

  it('fails a run whose worker is killed mid-run, returns its credit, and goes on with other runs', async () => {
    const before = creditBalance(ctx.db, firmId)
    const victim = await post({ recordId: longRecord.id, ...LONG })
    await firstProgress(queue, victim.body.id)
    const other = await post({ recordId: record.id, ...SMALL_JOB })
    await queue.workerFor(victim.body.id)!.terminate()
    expect(await runFinished(queue, ctx.db, victim.body.id)).toMatchObject({
      status: 'failed',
      error: expect.stringMatching(/stopped unexpectedly/),
    })
    const failed = getRun(ctx.db, firmId, victim.body.id)
    expect(failed).toMatchObject({ status: 'failed', creditsCharged: 0 })
    expect(ledgerRows(ctx.db, victim.body.id).map((r) => r.kind)).toEqual(['run_reserved', 'run_returned'])
    expect(await runFinished(queue, ctx.db, other.body.id)).toMatchObject({ status: 'succeeded' })
    expect(creditBalance(ctx.db, firmId)).toBe(before - 1)
  })

  it('hands consecutive runs to the same live thread instead of starting one per run', async () => {
    await withOwnQueue({ workerCount: 1 }, async (single) => {
      const ids: string[] = []
      for (let i = 0; i < 3; i++) ids.push((await post({ recordId: record.id, ...SMALL_JOB })).body.id)
      const threadIds: number[] = []
      for (const id of ids) {
        single.subscribe(id, (event) => {
          if (event.type === 'status' && event.status === 'running')
            threadIds.push(single.workerFor(id)!.threadId)
        })
      }
      single.start()
      for (const id of ids)
        expect(await runFinished(single, ctx.db, id)).toMatchObject({ status: 'succeeded' })
      expect(threadIds).toHaveLength(3)
      expect(new Set(threadIds).size).toBe(1)
      expect(single.threads).toBe(1)
    })
  })

  it('lets an idle thread exit after the idle period', async () => {
    await withOwnQueue({ workerCount: 1, idleMs: 100 }, async (brief) => {
      const res = await post({ recordId: record.id, ...SMALL_JOB })
      brief.start()
      expect(await runFinished(brief, ctx.db, res.body.id)).toMatchObject({ status: 'succeeded' })
      expect(brief.threads).toBe(1)
      await vi.waitFor(() => expect(brief.threads).toBe(0), { timeout: 5000 })
    })
  })

  /** Runs a job on a queue with a 0.05 s limit: it fails, its credit comes back and its threads end. */
  async function expectTimeLimit(workerCount: number, job: Record<string, unknown>) {
    await withOwnQueue({ workerCount, runTimeLimitS: 0.05 }, async (strict) => {
      const res = await post({ recordId: longRecord.id, ...job })
      strict.start()
      expect(await runFinished(strict, ctx.db, res.body.id)).toMatchObject({
        status: 'failed',
        error: expect.stringMatching(/longer than the limit of 0\.05 s/),
      })
      expect(ledgerRows(ctx.db, res.body.id).map((r) => r.kind)).toEqual(['run_reserved', 'run_returned'])
      await vi.waitFor(() => expect(strict.threads).toBe(0), { timeout: 5000 })
    })
  }

  it('fails a run over the time limit, terminates its thread and returns the credit', async () => {
    await expectTimeLimit(1, LONG)
  })

  describe('a run split over threads', () => {
    /** Large enough to be split on two threads (planRunParts), with no oscillator at the sub-step cap. */
    const SPLIT = { dampingRatios: [0.02, 0.05], periodGrid: { minS: 0.01, maxS: 20, count: 400 } }

    /** Every thread seen computing each run, collected at its progress events. */
    function watchThreads(q: RunQueue, ids: string[]): Map<string, Set<number>> {
      const seen = new Map(ids.map((id) => [id, new Set<number>()]))
      for (const id of ids) {
        q.subscribe(id, (event) => {
          if (event.type === 'progress') for (const w of q.workersFor(id)) seen.get(id)!.add(w.threadId)
        })
      }
      return seen
    }

    it("fails when one part's worker is killed, ends the other part's thread, returns the credit once, and goes on", async () => {
      const before = creditBalance(ctx.db, firmId)
      const victim = await post({ recordId: longRecord.id, ...SPLIT })
      await vi.waitFor(() => expect(queue.workersFor(victim.body.id)).toHaveLength(2), { timeout: 10_000 })
      const [killed, sibling] = queue.workersFor(victim.body.id)
      const siblingExit = new Promise((resolve) => sibling!.once('exit', resolve))
      await killed!.terminate()
      expect(await runFinished(queue, ctx.db, victim.body.id)).toMatchObject({
        status: 'failed',
        error: expect.stringMatching(/stopped unexpectedly/),
      })
      await siblingExit
      expect(queue.workersFor(victim.body.id)).toEqual([])
      expect(ledgerRows(ctx.db, victim.body.id).map((r) => r.kind)).toEqual(['run_reserved', 'run_returned'])
      const other = await post({ recordId: record.id, ...SMALL_JOB })
      expect(await runFinished(queue, ctx.db, other.body.id)).toMatchObject({ status: 'succeeded' })
      expect(creditBalance(ctx.db, firmId)).toBe(before - 1)
    })

    it("fails once with the engine's message when its parts refuse the record", async () => {
      const broken = insertBrokenRecord({ samples: longRecord.samples, dtS: 0.005 }, 4000)
      await expectEngineRefusal({ recordId: broken.id, ...SPLIT })
    })

    it('fails over the time limit and ends the threads of all its parts', async () => {
      await expectTimeLimit(2, SPLIT)
    })

    it(
      'is not split while other runs wait (one thread per run), nor with one worker thread',
      async () => {
        await withOwnQueue({ workerCount: 2 }, async (pool) => {
          const ids: string[] = []
          for (let i = 0; i < 3; i++) ids.push((await post({ recordId: longRecord.id, ...SPLIT })).body.id)
          const seen = watchThreads(pool, ids)
          pool.start()
          for (const id of ids)
            expect(await runFinished(pool, ctx.db, id)).toMatchObject({ status: 'succeeded' })
          // The first two were claimed with another waiting; the last had both threads free but
          // only one idle when it was claimed.
          expect(ids.map((id) => seen.get(id)!.size)).toEqual([1, 1, 1])
        })
        await withOwnQueue({ workerCount: 1 }, async (single) => {
          const res = await post({ recordId: longRecord.id, ...SPLIT })
          const seen = watchThreads(single, [res.body.id])
          single.start()
          expect(await runFinished(single, ctx.db, res.body.id)).toMatchObject({ status: 'succeeded' })
          expect(seen.get(res.body.id)!.size).toBe(1)
          expect(single.threads).toBe(1)
        })
      },
      LONG_JOB_TIMEOUT_MS,
    )
  })

  it(
    'puts a run back in the queue at a graceful stop, and the next start finishes it exactly once',
    async () => {
      const before = creditBalance(ctx.db, firmId)
      const res = await post({
        recordId: longRecord.id,
        dampingRatios: [0.05],
        periodGrid: { minS: 0.01, maxS: 20, count: 400 },
      })
      await firstProgress(queue, res.body.id)
      await queue.stop(0)
      const row = ctx.db
        .select({ status: runs.status, attempts: runs.attempts })
        .from(runs)
        .where(eq(runs.id, res.body.id))
        .get()
      expect(row).toEqual({ status: 'queued', attempts: 0 })
      restartSharedQueue()
      expect(await runFinished(queue, ctx.db, res.body.id)).toMatchObject({ status: 'succeeded' })
      expect(ledgerRows(ctx.db, res.body.id).map((r) => r.kind)).toEqual(['run_reserved'])
      expect(ctx.db.select({ n: count() }).from(spectra).where(eq(spectra.runId, res.body.id)).get()!.n).toBe(
        1,
      )
      expect(creditBalance(ctx.db, firmId)).toBe(before - 1)
    },
    LONG_JOB_TIMEOUT_MS,
  )
})

describe('RunQueue after a restart with queued and running runs', () => {
  it('queues the interrupted runs again and finishes each exactly once, spending each credit once', async () => {
    const other = await createTestContext()
    let restarted: RunQueue | undefined
    try {
      const otherFirm = other.seed.firmIds[0]!
      const theirs = insertRecord(
        other.db,
        {
          firmId: otherFirm,
          projectId: other.seed.projectIds[0]!,
          uploadedBy: other.seed.userIds['engineer@ordinate.test']!,
        },
        { samples: syntheticMotion(800, 0.01) },
      )
      setCredits(other.db, otherFirm, 10)
      const engineer = memberOf(other, 'engineer@ordinate.test')
      const ids: string[] = []
      for (let i = 0; i < 6; i++)
        ids.push(
          createRun(other.db, engineer, runRequestSchema.parse({ recordId: theirs.id, ...SMALL_JOB })).id,
        )
      // As a crash leaves them: three were running (one of them already started three times).
      other.db
        .update(runs)
        .set({ status: 'running', attempts: 1, startedAt: Date.now() })
        .where(eq(runs.id, ids[0]!))
        .run()
      other.db
        .update(runs)
        .set({ status: 'running', attempts: 2, startedAt: Date.now() })
        .where(eq(runs.id, ids[1]!))
        .run()
      other.db
        .update(runs)
        .set({ status: 'running', attempts: 3, startedAt: Date.now() })
        .where(eq(runs.id, ids[2]!))
        .run()
      expect(creditBalance(other.db, otherFirm)).toBe(4)

      restarted = new RunQueue({ db: other.db, workerCount: 2, runTimeLimitS: 60, idleMs: 5000 })
      restarted.start()
      const outcomes = await Promise.all(ids.map((id) => runFinished(restarted!, other.db, id)))
      expect(outcomes.map((o) => o.status)).toEqual([
        'succeeded',
        'succeeded',
        'failed',
        'succeeded',
        'succeeded',
        'succeeded',
      ])
      expect(outcomes[2]!.error).toMatch(/interrupted 3 times/)
      for (const [k, id] of ids.entries()) {
        const spectrumRows = other.db.select({ n: count() }).from(spectra).where(eq(spectra.runId, id)).get()!
          .n
        const kinds = other.db
          .select({ kind: creditLedger.kind })
          .from(creditLedger)
          .where(and(eq(creditLedger.runId, id)))
          .all()
          .map((r) => r.kind)
        if (k === 2) {
          expect(spectrumRows).toBe(0)
          expect(kinds).toEqual(['run_reserved', 'run_returned'])
        } else {
          expect(spectrumRows).toBe(1)
          expect(kinds).toEqual(['run_reserved'])
        }
      }
      expect(creditBalance(other.db, otherFirm)).toBe(5)
      // A second start finds nothing left to do.
      await restarted.stop(0)
      restarted = new RunQueue({ db: other.db, workerCount: 2, runTimeLimitS: 60 })
      restarted.start()
      expect(restarted.activeRunIds()).toEqual([])
      expect(other.db.select({ n: count() }).from(spectra).get()!.n).toBe(5)
    } finally {
      await restarted?.stop(0)
      other.close()
    }
  })
})
