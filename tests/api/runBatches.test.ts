import { Worker } from 'node:worker_threads'
import { count, eq, inArray } from 'drizzle-orm'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { creditLedger, runBatches, runBatchRuns, runs } from '../../server/db/schema.js'
import { findMember } from '../../server/middleware/auth.js'
import type { RunQueue } from '../../server/runs/runQueue.js'
import { creditBalance } from '../../server/services/credits.js'
import { MAX_BATCH_SUBJECTS } from '../../shared/schemas/runBatches.js'
import type { BatchWriterOutcome, BatchWriterTask } from '../support/batchWriter.js'
import { snapshotDb } from '../support/dbSnapshot.js'
import { engineerUpload, insertRecord, setCredits, startRunQueue } from '../support/runFixtures.js'
import { parseServerEvents } from '../support/serverEvents.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let queue: RunQueue | undefined
let engineer: request.Agent
let outsider: request.Agent
let firmId: string
let recordIds: string[]
let pairId: string
let foreignRecordId: string
let foreignPairId: string

/** A small job: five periods, one damping ratio. */
const SMALL = { periodsS: [0.1, 0.2, 0.5, 1, 2] }

const runCount = () => ctx.db.select({ n: count() }).from(runs).get()!.n

beforeAll(async () => {
  // No run queue yet: the refusals below compare whole-database snapshots, which a queue
  // computing earlier runs would change under them. The events tests attach one.
  ctx = await createTestContext()
  firmId = ctx.seed.firmIds[0]!
  const owner = engineerUpload(ctx.seed)
  recordIds = ['Batch A', 'Batch B', 'Batch C H1', 'Batch C H2'].map(
    (name) => insertRecord(ctx.db, owner, { name, points: 400 }).id,
  )
  engineer = await ctx.signIn('engineer@ordinate.test')
  outsider = await ctx.signIn('outsider@ordinate.test')
  const pair = await engineer.post('/api/record-pairs').send({ recordIds: [recordIds[2], recordIds[3]] })
  expect(pair.status).toBe(201)
  pairId = pair.body.id
  const foreignOwner = {
    firmId: ctx.seed.firmIds[1]!,
    projectId: ctx.seed.projectIds[1]!,
    uploadedBy: ctx.seed.userIds['outsider@ordinate.test']!,
  }
  const foreign = [0, 1].map(() => insertRecord(ctx.db, foreignOwner, { points: 400 }).id)
  foreignRecordId = foreign[0]!
  const foreignPair = await outsider.post('/api/record-pairs').send({ recordIds: foreign })
  expect(foreignPair.status).toBe(201)
  foreignPairId = foreignPair.body.id
})
afterAll(async () => {
  await queue?.stop(0)
  ctx.close()
})

describe('POST /api/run-batches', () => {
  it('answers 202 with one run per subject, records first then pairs in the order given, one credit each', async () => {
    setCredits(ctx.db, firmId, 10)
    const res = await engineer.post('/api/run-batches').send({
      recordIds: [recordIds[1], recordIds[0]],
      pairIds: [pairId],
      combinations: ['rotd50'],
      ...SMALL,
    })
    expect(res.status).toBe(202)
    expect(Object.keys(res.body).sort()).toEqual(['id', 'runIds'])
    expect(res.body.runIds).toHaveLength(3)
    const rows = res.body.runIds.map((id: string) =>
      ctx.db
        .select({ recordId: runs.recordId, pairId: runs.pairId })
        .from(runs)
        .where(eq(runs.id, id))
        .get()!,
    )
    expect(rows).toEqual([
      { recordId: recordIds[1], pairId: null },
      { recordId: recordIds[0], pairId: null },
      { recordId: null, pairId },
    ])
    const reserved = ctx.db
      .select({ runId: creditLedger.runId, delta: creditLedger.delta })
      .from(creditLedger)
      .where(inArray(creditLedger.runId, res.body.runIds))
      .all()
    expect(reserved.map((r) => r.delta)).toEqual([-1, -1, -1])
    expect(creditBalance(ctx.db, firmId)).toBe(7)
  })

  it('gives each run the settings POST /api/runs gives it, defaults included', async () => {
    setCredits(ctx.db, firmId, 10)
    const single = await engineer.post('/api/runs').send({ recordId: recordIds[0] })
    const pairRun = await engineer.post('/api/runs').send({ pairId, combinations: ['geomean', 'rotd100'] })
    const batch = await engineer
      .post('/api/run-batches')
      .send({ recordIds: [recordIds[0]], pairIds: [pairId], combinations: ['geomean', 'rotd100'] })
    expect([single.status, pairRun.status, batch.status]).toEqual([202, 202, 202])
    const settings = (id: string) =>
      ctx.db.select({ s: runs.settings }).from(runs).where(eq(runs.id, id)).get()!.s
    expect(settings(batch.body.runIds[0])).toEqual(settings(single.body.id))
    expect(settings(batch.body.runIds[1])).toEqual(settings(pairRun.body.id))
    expect(settings(batch.body.runIds[0])).toMatchObject({ method: 'newmark-average', dampingRatios: [0.05] })
  })

  describe('with too few credits for every subject', () => {
    it('answers 402 no_credits with needed and balance, and creates no run', async () => {
      setCredits(ctx.db, firmId, 2)
      const before = snapshotDb(ctx.db)
      const res = await engineer.post('/api/run-batches').send({ recordIds: recordIds.slice(0, 3), ...SMALL })
      expect(res.status).toBe(402)
      expect(res.body.error).toMatchObject({ code: 'no_credits', needed: 3, balance: 2 })
      expect(res.body.error.message).toMatch(/3 run credits.*has 2/)
      expect(snapshotDb(ctx.db)).toEqual(before)
    })
  })

  describe('with an unknown or foreign subject', () => {
    for (const [label, body] of [
      ['an unknown record', () => ({ recordIds: [recordIds[0], '00000000-0000-4000-8000-000000000000'] })],
      ['another firm’s record', () => ({ recordIds: [recordIds[0], foreignRecordId] })],
      [
        'another firm’s pair',
        () => ({ recordIds: [recordIds[0]], pairIds: [foreignPairId], combinations: ['rotd50'] }),
      ],
    ] as const) {
      it(`answers 404 for ${label} naming it, and creates nothing`, async () => {
        setCredits(ctx.db, firmId, 10)
        const before = snapshotDb(ctx.db)
        const res = await engineer.post('/api/run-batches').send({ ...body(), ...SMALL })
        expect(res.status).toBe(404)
        expect(res.body.error.message).toMatch(/(recordIds|pairIds)\[1\]|pairIds\[0\]/)
        expect(snapshotDb(ctx.db)).toEqual(before)
      })
    }
  })

  describe('with a body it refuses', () => {
    const cases: [string, () => Record<string, unknown>, RegExp][] = [
      ['no subjects', () => ({ recordIds: [] }), /at least one record or pair/],
      [
        `more than ${MAX_BATCH_SUBJECTS} subjects`,
        () => ({
          recordIds: Array.from(
            { length: MAX_BATCH_SUBJECTS + 1 },
            (_, i) => `00000000-0000-4000-8000-${String(i).padStart(12, '0')}`,
          ),
        }),
        /at most 100/,
      ],
      [
        'a repeated record',
        () => ({ recordIds: [recordIds[0], recordIds[0]] }),
        /^recordIds: Give each record once/,
      ],
      ['a repeated pair', () => ({ pairIds: [pairId, pairId], combinations: ['rotd50'] }), /^pairIds:/],
      [
        'revisionOf',
        () => ({ recordIds: [recordIds[0]], revisionOf: recordIds[0] }),
        /^revisionOf: A batch starts first runs only/,
      ],
      ['pairs without combinations', () => ({ pairIds: [pairId] }), /^combinations:/],
      [
        'combinations without pairs',
        () => ({ recordIds: [recordIds[0]], combinations: ['rotd50'] }),
        /^combinations:/,
      ],
      [
        'both periodsS and periodGrid',
        () => ({ recordIds: [recordIds[0]], periodsS: [1], periodGrid: { minS: 0.1, maxS: 1, count: 5 } }),
        /^periodGrid:/,
      ],
      [
        'a damping ratio given as a percentage',
        () => ({ recordIds: [recordIds[0]], dampingRatios: [5] }),
        /^dampingRatios\.0:/,
      ],
    ]
    for (const [label, body, message] of cases) {
      it(`answers 400 for ${label}, naming the field, and writes nothing`, async () => {
        setCredits(ctx.db, firmId, 500)
        const before = snapshotDb(ctx.db)
        const res = await engineer.post('/api/run-batches').send(body())
        expect(res.status).toBe(400)
        expect(res.body.error.message).toMatch(message)
        expect(snapshotDb(ctx.db)).toEqual(before)
      })
    }
  })

  it('refuses an admin who is not also an engineer or checker with 403', async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    expect((await admin.post('/api/run-batches').send({ recordIds: [recordIds[0]] })).status).toBe(403)
  })
})

describe('concurrent batches', () => {
  it('are all or nothing over HTTP: of three 4-run batches on 10 credits, exactly two start', async () => {
    setCredits(ctx.db, firmId, 10)
    const runsBefore = runCount()
    const answers = await Promise.all(
      [0, 1, 2].map(() => engineer.post('/api/run-batches').send({ recordIds, ...SMALL })),
    )
    const statuses = answers.map((a) => a.status).sort()
    expect(statuses).toEqual([202, 202, 402])
    expect(answers.find((a) => a.status === 402)!.body.error).toMatchObject({ needed: 4, balance: 2 })
    expect(runCount() - runsBefore).toBe(8)
    expect(creditBalance(ctx.db, firmId)).toBe(2)
  })

  it('never overspend across connections: writers on other threads race for the same credits', async () => {
    const WRITERS = 4
    const ATTEMPTS = 5
    setCredits(ctx.db, firmId, 20)
    const runsBefore = runCount()
    const batchesBefore = ctx.db.select({ n: count() }).from(runBatches).get()!.n
    const startLine = new SharedArrayBuffer(4)
    const member = findMember(ctx.db, ctx.seed.userIds['engineer@ordinate.test']!)!
    const outcomes = await Promise.all(
      Array.from({ length: WRITERS }, () => {
        const task: BatchWriterTask = {
          databasePath: ctx.deps.config.databasePath,
          member,
          recordIds: recordIds.slice(0, 3),
          attempts: ATTEMPTS,
          startLine,
          writers: WRITERS,
        }
        const worker = new Worker(new URL('../support/batchWriter.worker.mjs', import.meta.url), {
          workerData: task,
        })
        return new Promise<BatchWriterOutcome>((resolve, reject) => {
          worker.once('message', resolve)
          worker.once('error', reject)
        })
      }),
    )
    expect(outcomes.flatMap((o) => o.errors)).toEqual([])
    const accepted = outcomes.flatMap((o) => o.accepted)
    const refused = outcomes.flatMap((o) => o.refused)
    // 20 credits buy six batches of three; the other fourteen attempts are refused whole.
    expect(accepted).toHaveLength(6)
    expect(refused).toHaveLength(WRITERS * ATTEMPTS - 6)
    expect(refused.every((r) => r.status === 402 && r.code === 'no_credits' && r.needed === 3)).toBe(true)
    expect(creditBalance(ctx.db, firmId)).toBe(2)
    expect(runCount() - runsBefore).toBe(18)
    expect(ctx.db.select({ n: count() }).from(runBatches).get()!.n - batchesBefore).toBe(6)
    for (const batch of accepted) {
      const members = ctx.db
        .select({ runId: runBatchRuns.runId })
        .from(runBatchRuns)
        .where(eq(runBatchRuns.batchId, batch.id))
        .all()
      expect(members.map((m) => m.runId).sort()).toEqual([...batch.runIds].sort())
    }
  })
})

describe('GET /api/run-batches/:id and its events', () => {
  let batchId: string
  let runIds: string[]

  beforeAll(async () => {
    // Only this batch is computed: the runs queued by the tests above are set aside.
    ctx.db
      .update(runs)
      .set({ status: 'failed', error: 'set aside by the test' })
      .where(eq(runs.status, 'queued'))
      .run()
    setCredits(ctx.db, firmId, 10)
    const res = await engineer.post('/api/run-batches').send({
      recordIds: [recordIds[0], recordIds[1]],
      pairIds: [pairId],
      combinations: ['rotd50'],
      ...SMALL,
    })
    expect(res.status).toBe(202)
    batchId = res.body.id
    runIds = res.body.runIds
  })

  it('streams each run’s status and progress with its runId, and closes when every run has finished', async () => {
    queue = startRunQueue(ctx, { workerCount: 1, runTimeLimitS: 60, idleMs: 2000 })
    const stream = await engineer.get(`/api/run-batches/${batchId}/events`).buffer(true)
    expect(stream.status).toBe(200)
    expect(stream.headers['content-type']).toMatch(/^text\/event-stream/)
    const events = parseServerEvents(stream.text)
    expect(events.every((e) => runIds.includes(e.data.runId as string))).toBe(true)
    expect(events.slice(0, 3).map((e) => [e.event, e.data.runId])).toEqual(runIds.map((id) => ['status', id]))
    for (const runId of runIds) {
      const last = events.filter((e) => e.data.runId === runId && e.event === 'status').at(-1)
      expect(last?.data).toMatchObject({ status: 'succeeded', progress: 1, error: null })
    }
  })

  it('answers the settings, the runs in order with their states, and counts by state', async () => {
    const res = await engineer.get(`/api/run-batches/${batchId}`)
    expect(res.status).toBe(200)
    expect(res.body.runs.map((r: { id: string }) => r.id)).toEqual(runIds)
    expect(res.body).toMatchObject({
      id: batchId,
      projectId: ctx.seed.projectIds[0],
      recordIds: [recordIds[0], recordIds[1]],
      pairIds: [pairId],
      counts: { queued: 0, running: 0, succeeded: 3, failed: 0 },
      finished: true,
      settings: { periodsS: SMALL.periodsS, dampingRatios: [0.05], combinations: ['rotd50'] },
      createdBy: { name: 'Ines Marlowe' },
    })
  })

  it('answers a finished batch’s stream with one status per run, then closes', async () => {
    const stream = await engineer.get(`/api/run-batches/${batchId}/events`).buffer(true)
    expect(parseServerEvents(stream.text).map((e) => [e.event, e.data.runId, e.data.status])).toEqual(
      runIds.map((id) => ['status', id, 'succeeded']),
    )
  })

  it('lists the batch on GET /api/run-batches, newest first, and by project', async () => {
    const all = await engineer.get('/api/run-batches')
    expect(all.body.items[0]).toMatchObject({ id: batchId, finished: true })
    expect(all.body.items[0].runs).toBeUndefined()
    const other = await engineer.get(`/api/run-batches?projectId=${ctx.seed.projectIds[1]}`)
    expect(other.body.items).toEqual([])
  })

  it('answers 404 to another firm, for the batch and its events', async () => {
    expect((await outsider.get(`/api/run-batches/${batchId}`)).status).toBe(404)
    expect((await outsider.get(`/api/run-batches/${batchId}/events`)).status).toBe(404)
    expect((await outsider.get('/api/run-batches')).body.items).toEqual([])
  })
})
