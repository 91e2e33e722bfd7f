import { and, count, eq } from 'drizzle-orm'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { creditLedger, runs, spectra } from '../../server/db/schema.js'
import { RunQueue, type RunEvent } from '../../server/runs/runQueue.js'
import { creditBalance } from '../../server/services/credits.js'
import { insertRecord, setCredits, type InsertedRecord } from '../support/runFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let queue: RunQueue
let engineer: request.Agent
let record: InsertedRecord
let firmId: string

/** A small job: 12 periods, 2 damping ratios. */
const SMALL = { dampingRatios: [0.05, 0.1], periodsS: [0.05, 0.1, 0.2, 0.3, 0.5, 0.7, 1, 1.5, 2, 3, 4, 5] }

/** Resolves with the run's final status, whether it ended before or after the call. */
function finished(runId: string): Promise<{ status: string; error: string | null }> {
  return new Promise((resolve) => {
    const off = queue.subscribe(runId, (event: RunEvent) => {
      if (event.type === 'status' && (event.status === 'succeeded' || event.status === 'failed')) {
        off()
        resolve(event)
      }
    })
    const row = ctx.db.select({ status: runs.status, error: runs.error }).from(runs).where(eq(runs.id, runId)).get()
    if (row && (row.status === 'succeeded' || row.status === 'failed')) {
      off()
      resolve(row)
    }
  })
}

beforeAll(async () => {
  ctx = await createTestContext((deps) => {
    queue = new RunQueue({ db: deps.db, workerCount: 2, runTimeLimitS: 60, idleMs: 2000 })
    deps.runQueue = queue
  })
  queue.start()
  firmId = ctx.seed.firmIds[0]!
  record = insertRecord(ctx.db, { firmId, projectId: ctx.seed.projectIds[0]!, uploadedBy: ctx.seed.userIds['engineer@ordinate.test']! })
  setCredits(ctx.db, firmId, 200)
  engineer = await ctx.signIn('engineer@ordinate.test')
})
afterAll(async () => {
  await queue.stop(0)
  ctx.close()
})

describe('POST /api/runs', () => {
  it('queues a run, reserves a credit and computes it on a worker thread', async () => {
    const before = creditBalance(ctx.db, firmId)
    const res = await engineer.post('/api/runs').send({ recordId: record.id, ...SMALL })
    expect(res.status).toBe(202)
    expect(res.body.status).toBe('queued')
    expect(creditBalance(ctx.db, firmId)).toBe(before - 1)
    expect(await finished(res.body.id)).toMatchObject({ status: 'succeeded' })
    const run = await engineer.get(`/api/runs/${res.body.id}`)
    expect(run.body).toMatchObject({ status: 'succeeded', progress: 1, creditsCharged: 1 })
    const spectrum = await engineer.get(`/api/runs/${res.body.id}/spectrum`)
    expect(spectrum.status).toBe(200)
    expect(spectrum.body.curves).toHaveLength(2)
    expect(ctx.db.select({ n: count() }).from(spectra).where(eq(spectra.runId, res.body.id)).get()!.n).toBe(1)
    expect(
      ctx.db.select({ n: count() }).from(creditLedger).where(and(eq(creditLedger.runId, res.body.id))).get()!.n,
    ).toBe(1)
    expect(ctx.db.select().from(runs).where(eq(runs.id, res.body.id)).get()!.engineVersion).toMatch(/ordinate-spectra/)
  })
})
