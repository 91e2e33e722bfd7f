import { Worker } from 'node:worker_threads'
import { and, count, eq, like } from 'drizzle-orm'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { creditLedger, reviewComments, runs } from '../../server/db/schema.js'
import { findMember, type Member } from '../../server/middleware/auth.js'
import { creditBalance } from '../../server/services/credits.js'
import { insertSucceededRun } from '../support/comparisonFixtures.js'
import type { WriterTask } from '../support/concurrentWriter.js'
import { insertRecord, setCredits } from '../support/runFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

/**
 * SQLite in WAL mode with a busy timeout (server/db/client.ts): writers on other connections to
 * the same file (worker threads here, as other processes would be) and the API's own requests
 * all write at once, and none of them fails with SQLITE_BUSY. A control run with the timeout set
 * to 0 shows that the writers really do collide.
 */
const WRITERS = 4
const WRITES_EACH = 150

let ctx: TestContext
let engineer: request.Agent
let checkerMember: Member
let reviewId: string
let recordId: string
let firmId: string

beforeAll(async () => {
  ctx = await createTestContext()
  firmId = ctx.seed.firmIds[0]!
  const engineerId = ctx.seed.userIds['engineer@ordinate.test']!
  engineer = await ctx.signIn('engineer@ordinate.test')
  checkerMember = findMember(ctx.db, ctx.seed.userIds['checker@ordinate.test']!)!
  const runId = insertSucceededRun(
    ctx.db,
    { firmId, projectId: ctx.seed.projectIds[0]!, userId: engineerId },
    { name: 'Contended run', periodsS: [0.2, 1], curves: [{ dampingRatio: 0.05, psaG: [1, 0.4] }] },
  )
  const review = await engineer.post('/api/reviews').send({ subjectType: 'run', subjectId: runId })
  expect(review.status).toBe(201)
  reviewId = review.body.id
  recordId = insertRecord(ctx.db, { firmId, projectId: ctx.seed.projectIds[0]!, uploadedBy: engineerId }).id
})
afterAll(() => ctx.close())

function startWriters(busyTimeoutMs?: number) {
  const startLine = new SharedArrayBuffer(4)
  return Array.from({ length: WRITERS }, (_, writer) => {
    const task: WriterTask = {
      databasePath: ctx.deps.config.databasePath,
      writer,
      writes: WRITES_EACH,
      member: checkerMember,
      reviewId,
      busyTimeoutMs,
      startLine,
      writers: WRITERS,
    }
    const worker = new Worker(new URL('../support/concurrentWriter.worker.mjs', import.meta.url), {
      workerData: task,
    })
    return new Promise<{ done: number; errors: string[] }>((resolve, reject) => {
      worker.once('message', resolve)
      worker.once('error', reject)
    })
  })
}

const writerGrants = () =>
  ctx.db
    .select({ n: count() })
    .from(creditLedger)
    .where(and(eq(creditLedger.kind, 'grant'), like(creditLedger.note, 'writer %')))
    .get()!.n

describe('concurrent writers on one SQLite file', () => {
  it('never fail with SQLITE_BUSY: other connections and the API all complete, and the ledger balances', async () => {
    setCredits(ctx.db, firmId, 1000)
    const commentsBefore = ctx.db.select({ n: count() }).from(reviewComments).get()!.n
    const runsBefore = ctx.db.select({ n: count() }).from(runs).get()!.n
    let finished = false
    const writers = Promise.all(startWriters()).finally(() => (finished = true))

    // Meanwhile the API writes too: uploads, runs (each reserves a credit), comments and projects.
    const statuses: number[] = []
    let runsAccepted = 0
    let apiComments = 0
    for (let round = 0; !finished || round < 5; round++) {
      const results = await Promise.all([
        engineer
          .post('/api/records')
          .field('units', 'g')
          .field('dtS', '0.01')
          .attach(
            'file',
            Buffer.from(`# synthetic, round ${round}\n` + '0\n0.01\n-0.01\n'.repeat(8)),
            'r.txt',
          ),
        engineer.post('/api/runs').send({ recordId, periodsS: [0.5] }),
        engineer.post(`/api/reviews/${reviewId}/comments`).send({ body: `API comment ${round}` }),
        engineer.post('/api/projects').send({ name: `Contended project ${round}` }),
      ])
      for (const res of results) statuses.push(res.status)
      runsAccepted += results[1]!.status === 202 ? 1 : 0
      apiComments += results[2]!.status === 201 ? 1 : 0
    }
    const outcomes = await writers

    expect(outcomes.flatMap((o) => o.errors)).toEqual([])
    expect(outcomes.map((o) => o.done)).toEqual(new Array(WRITERS).fill(WRITES_EACH))
    expect(statuses.filter((s) => s >= 300)).toEqual([])
    expect(writerGrants()).toBe((WRITERS * WRITES_EACH) / 2)
    expect(ctx.db.select({ n: count() }).from(reviewComments).get()!.n - commentsBefore).toBe(
      (WRITERS * WRITES_EACH) / 2 + apiComments,
    )
    expect(ctx.db.select({ n: count() }).from(runs).get()!.n - runsBefore).toBe(runsAccepted)
    expect(creditBalance(ctx.db, firmId)).toBe(1000 + (WRITERS * WRITES_EACH) / 2 - runsAccepted)
  })

  it('do collide (the control): with the busy timeout at 0 the same writers meet SQLITE_BUSY', async () => {
    const outcomes = await Promise.all(startWriters(0))
    const errors = outcomes.flatMap((o) => o.errors)
    expect(errors.length).toBeGreaterThan(0)
    expect(new Set(errors.map((e) => e.replace(/_SNAPSHOT$/, '')))).toEqual(new Set(['SQLITE_BUSY']))
  })
})
