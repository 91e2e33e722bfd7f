import type { AddressInfo } from 'node:net'
import { asc, count, eq } from 'drizzle-orm'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { creditLedger, memberships, records, runs, spectra, users } from '../../server/db/schema.js'
import { newId } from '../../server/ids.js'
import type { RunQueue } from '../../server/runs/runQueue.js'
import { planRunParts } from '../../server/runs/splitRun.js'
import { hashPassword } from '../../server/services/auth.js'
import { creditBalance } from '../../server/services/credits.js'
import { createRecord } from '../../server/services/records.js'
import type { RunSettings } from '../../shared/schemas/runs.js'
import { spectrumResultSchema } from '../../shared/schemas/spectrum.js'
import { computeSpectrum, type SpectrumSettings } from '../../shared/spectra/computeSpectrum.js'
import { demoRecord } from '../../shared/spectra/demo/demoRecords.js'
import { parseRecord } from '../../shared/spectra/parseRecord.js'
import { recordParameters, recordWarnings } from '../../shared/spectra/recordParameters.js'
import { toSpectrumJson } from '../../shared/spectra/toSpectrumJson.js'
import { DEFAULT_PERIOD_GRID, defaultPeriodsS, logPeriodGrid } from '../../shared/spectra/periods.js'
import {
  engineerUpload,
  type InsertedRecord,
  insertRecord,
  runFinished,
  setCredits,
  SMALL_JOB,
  startRunQueue,
  syntheticMotion,
} from '../support/runFixtures.js'
import { parseServerEvents } from '../support/serverEvents.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let queue: RunQueue
let engineer: request.Agent
let checker: request.Agent
let admin: request.Agent
let adminEngineer: request.Agent
let outsider: request.Agent
let record: InsertedRecord
let firmId: string
let projectId: string

const runCount = (db: TestContext['db']) => db.select({ n: count() }).from(runs).get()!.n
const ledgerRows = (db: TestContext['db'], runId: string) =>
  db
    .select({ kind: creditLedger.kind, delta: creditLedger.delta })
    .from(creditLedger)
    .where(eq(creditLedger.runId, runId))
    .all()

async function addMember(email: string, roles: string[]): Promise<void> {
  const userId = newId()
  ctx.db
    .insert(users)
    .values({
      id: userId,
      email,
      name: 'Aud Linnea Sorvik',
      passwordHash: await hashPassword('ordinate-demo', 4),
    })
    .run()
  ctx.db.insert(memberships).values({ id: newId(), firmId, userId, roles }).run()
}

beforeAll(async () => {
  ctx = await createTestContext()
  queue = startRunQueue(ctx, { workerCount: 2, runTimeLimitS: 60, idleMs: 5000 })
  firmId = ctx.seed.firmIds[0]!
  projectId = ctx.seed.projectIds[0]!
  record = insertRecord(ctx.db, {
    firmId,
    projectId,
    uploadedBy: ctx.seed.userIds['engineer@ordinate.test']!,
  })
  setCredits(ctx.db, firmId, 500)
  await addMember('admin-engineer@ordinate.test', ['admin', 'engineer'])
  ;[engineer, checker, admin, adminEngineer, outsider] = await Promise.all([
    ctx.signIn('engineer@ordinate.test'),
    ctx.signIn('checker@ordinate.test'),
    ctx.signIn('admin@ordinate.test'),
    ctx.signIn('admin-engineer@ordinate.test'),
    ctx.signIn('outsider@ordinate.test'),
  ])
})
afterAll(async () => {
  await queue.stop(0)
  ctx.close()
})

/** Posts a run as `agent` and waits for it to end; answers the run as GET /api/runs/:id gives it. */
async function runToEnd(agent: request.Agent, body: Record<string, unknown>) {
  const res = await agent.post('/api/runs').send(body)
  expect(res.status, JSON.stringify(res.body)).toBe(202)
  await runFinished(queue, ctx.db, res.body.id as string)
  return (await agent.get(`/api/runs/${res.body.id}`)).body as Record<string, unknown> & { id: string }
}

let smallRun: Record<string, unknown> & { id: string }

/** Writes a run of the test record (with the small run's settings) straight into the table, for no queue to take. */
function insertRunRow(fields: Pick<typeof runs.$inferInsert, 'status' | 'error' | 'attempts'>): string {
  const id = newId()
  ctx.db
    .insert(runs)
    .values({
      id,
      firmId,
      projectId,
      recordId: record.id,
      settings: smallRun.settings as RunSettings,
      recordSha256: record.sha256,
      createdBy: ctx.seed.userIds['engineer@ordinate.test']!,
      ...fields,
    })
    .run()
  return id
}

describe('POST /api/runs', () => {
  it('queues a run (202), reserves one credit, and a worker thread computes it', async () => {
    const before = creditBalance(ctx.db, firmId)
    const res = await engineer.post('/api/runs').send({ recordId: record.id, ...SMALL_JOB })
    expect(res.status).toBe(202)
    expect(res.body).toMatchObject({
      status: 'queued',
      recordId: record.id,
      projectId,
      creditsCharged: 0,
      recordSha256: record.sha256,
    })
    expect(creditBalance(ctx.db, firmId)).toBe(before - 1)
    expect(await runFinished(queue, ctx.db, res.body.id)).toMatchObject({ status: 'succeeded' })
    smallRun = (await engineer.get(`/api/runs/${res.body.id}`)).body
    expect(smallRun).toMatchObject({ status: 'succeeded', progress: 1, error: null, creditsCharged: 1 })
    expect(smallRun.engineVersion).toMatch(/ordinate-spectra/)
    expect(Object.keys(smallRun.timings as object).sort()).toEqual([
      'computeMs',
      'parts',
      'queuedMs',
      'runMs',
    ])
    expect((smallRun.timings as { parts: number }).parts).toBe(1)
    // Spent, not returned: one reservation and nothing else.
    expect(ledgerRows(ctx.db, res.body.id)).toEqual([{ kind: 'run_reserved', delta: -1 }])
    expect(creditBalance(ctx.db, firmId)).toBe(before - 1)
    expect(ctx.db.select({ n: count() }).from(spectra).where(eq(spectra.runId, res.body.id)).get()!.n).toBe(1)
  })

  it('lets a checker start a run (independent re-runs)', async () => {
    const run = await runToEnd(checker, { recordId: record.id, ...SMALL_JOB })
    expect(run.status).toBe('succeeded')
  })

  it('lets an admin who is also an engineer start a run', async () => {
    const res = await adminEngineer.post('/api/runs').send({ recordId: record.id, ...SMALL_JOB })
    expect(res.status).toBe(202)
    await runFinished(queue, ctx.db, res.body.id)
  })

  it('refuses an admin without the engineer or checker role with 403 naming the roles, storing nothing', async () => {
    const before = runCount(ctx.db)
    const res = await admin.post('/api/runs').send({ recordId: record.id })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/engineer/)
    expect(res.body.error.message).toMatch(/checker/)
    expect(runCount(ctx.db)).toBe(before)
  })

  it('answers 401 when signed out', async () => {
    const res = await ctx.anonymous().post('/api/runs').send({ recordId: record.id })
    expect(res.status).toBe(401)
  })

  it("answers 404 for another firm's record and spends none of the caller's credits", async () => {
    const outsiderFirm = ctx.seed.firmIds[1]!
    const before = creditBalance(ctx.db, outsiderFirm)
    const res = await outsider.post('/api/runs').send({ recordId: record.id })
    expect(res.status).toBe(404)
    expect(res.body.error.code).toBe('not_found')
    expect(creditBalance(ctx.db, outsiderFirm)).toBe(before)
  })

  it('uses the default grid (100 per decade, 0.01–10 s), 5% damping and average-acceleration Newmark when nothing is given', async () => {
    const res = await engineer.post('/api/runs').send({ recordId: record.id })
    expect(res.status).toBe(202)
    expect(res.body.settings).toEqual({
      method: 'newmark-average',
      dampingRatios: [0.05],
      periodsS: [...DEFAULT_PERIOD_GRID],
      periodChoice: 'default',
      periodGrid: null,
    })
    expect(res.body.settings.periodsS).toHaveLength(301)
    await runFinished(queue, ctx.db, res.body.id)
  })

  it('uses periodsS exactly as given, in the given order', async () => {
    const periodsS = [2, 0.5, 1.25, 0.0375]
    const run = await runToEnd(engineer, { recordId: record.id, periodsS, method: 'piecewise-exact' })
    expect(run.settings).toMatchObject({ periodsS, periodChoice: 'list', method: 'piecewise-exact' })
    const spectrum = await engineer.get(`/api/runs/${run.id}/spectrum`)
    expect(spectrum.body.periodsS).toEqual(periodsS)
  })

  it('spreads a periodGrid log-evenly from minS to maxS', async () => {
    const res = await engineer
      .post('/api/runs')
      .send({ recordId: record.id, periodGrid: { minS: 0.1, maxS: 4, count: 25 }, method: 'newmark-linear' })
    expect(res.status).toBe(202)
    expect(res.body.settings.periodsS).toEqual(logPeriodGrid(0.1, 4, 25))
    expect(res.body.settings).toMatchObject({
      periodChoice: 'grid',
      periodGrid: { minS: 0.1, maxS: 4, count: 25 },
    })
    await runFinished(queue, ctx.db, res.body.id)
  })

  describe('with bad settings', () => {
    const cases: [string, Record<string, unknown>, RegExp][] = [
      ['a damping ratio of 0.5', { dampingRatios: [0.5] }, /^dampingRatios\.0: .*below 0\.5/],
      ['a negative damping ratio', { dampingRatios: [-0.01] }, /^dampingRatios\.0:/],
      [
        '11 damping ratios',
        { dampingRatios: Array.from({ length: 11 }, (_, i) => i / 100) },
        /^dampingRatios: .*at most 10/,
      ],
      ['no damping ratio', { dampingRatios: [] }, /^dampingRatios:/],
      ['a zero period', { periodsS: [0, 1] }, /^periodsS\.0: .*positive/],
      ['a period over 20 s', { periodsS: [1, 20.5] }, /^periodsS\.1: .*at most 20 s/],
      [
        '2,001 periods',
        { periodsS: Array.from({ length: 2001 }, (_, i) => 0.01 + i * 0.001) },
        /^periodsS: .*at most 2000/,
      ],
      ['no periods', { periodsS: [] }, /^periodsS:/],
      ['a repeated period', { periodsS: [1, 1] }, /^periodsS: .*once/],
      ['an unknown method', { method: 'runge-kutta' }, /^method:/],
      [
        'both periodsS and periodGrid',
        { periodsS: [1], periodGrid: { minS: 0.1, maxS: 1, count: 10 } },
        /either periodsS or periodGrid/,
      ],
      ['a grid reaching past 20 s', { periodGrid: { minS: 0.1, maxS: 30, count: 10 } }, /^periodGrid\.maxS:/],
      ['a grid of 2,001 points', { periodGrid: { minS: 0.1, maxS: 10, count: 2001 } }, /^periodGrid\.count:/],
      ['an unknown field', { colour: 'red' }, /colour/],
      ['a text damping ratio', { dampingRatios: ['5%'] }, /^dampingRatios\.0:/],
    ]
    it.each(cases)(
      'answers 400 for %s, storing no run and spending no credit',
      async (_name, settings, message) => {
        const before = { runs: runCount(ctx.db), balance: creditBalance(ctx.db, firmId) }
        const res = await engineer.post('/api/runs').send({ recordId: record.id, ...settings })
        expect(res.status).toBe(400)
        expect(res.body.error.code).toBe('invalid_input')
        expect(res.body.error.message).toMatch(message)
        expect({ runs: runCount(ctx.db), balance: creditBalance(ctx.db, firmId) }).toEqual(before)
      },
    )

    it('answers 400 without a recordId', async () => {
      const res = await engineer.post('/api/runs').send({ dampingRatios: [0.05] })
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(/^recordId:/)
    })
  })

  describe('when the firm has no credits', () => {
    it("answers 402 { code: 'no_credits' } and stores no run", async () => {
      const outsiderFirm = ctx.seed.firmIds[1]!
      const theirs = insertRecord(ctx.db, {
        firmId: outsiderFirm,
        projectId: ctx.seed.projectIds[1]!,
        uploadedBy: ctx.seed.userIds['outsider@ordinate.test']!,
      })
      setCredits(ctx.db, outsiderFirm, 0)
      const before = runCount(ctx.db)
      const res = await outsider.post('/api/runs').send({ recordId: theirs.id })
      expect(res.status).toBe(402)
      expect(res.body.error.code).toBe('no_credits')
      expect(res.body.error.message).toMatch(/credit/)
      expect(runCount(ctx.db)).toBe(before)
      expect(creditBalance(ctx.db, outsiderFirm)).toBe(0)
    })
  })
})

describe('30 runs posted at once with 25 credits', () => {
  it('accepts exactly 25, refuses 5 with 402, and the balance never goes below zero', async () => {
    // A second app on its own database and no queue, so the 25 runs stay queued.
    const other = await createTestContext()
    try {
      const otherFirm = other.seed.firmIds[0]!
      const theirs = insertRecord(other.db, engineerUpload(other.seed))
      setCredits(other.db, otherFirm, 25)
      const agent = await other.signIn('engineer@ordinate.test')
      const answers = await Promise.all(
        Array.from({ length: 30 }, () => agent.post('/api/runs').send({ recordId: theirs.id, ...SMALL_JOB })),
      )
      const statuses = answers.map((a) => a.status)
      expect(statuses.filter((s) => s === 202)).toHaveLength(25)
      expect(statuses.filter((s) => s === 402)).toHaveLength(5)
      expect(runCount(other.db)).toBe(25)
      expect(creditBalance(other.db, otherFirm)).toBe(0)
      // Walk the append-only ledger in order: no prefix sum is negative.
      let running = 0
      for (const row of other.db
        .select({ delta: creditLedger.delta })
        .from(creditLedger)
        .where(eq(creditLedger.firmId, otherFirm))
        .orderBy(asc(creditLedger.id))
        .all()) {
        running += row.delta
        expect(running).toBeGreaterThanOrEqual(0)
      }
    } finally {
      other.close()
    }
  })
})

describe('GET /api/runs', () => {
  it.each([
    ['engineer', () => engineer],
    ['checker', () => checker],
    ['admin', () => admin],
  ])("lists the firm's runs, newest first, for the %s", async (_role, agent) => {
    const res = await agent().get('/api/runs')
    expect(res.status).toBe(200)
    const items = res.body.items as { id: string; createdAt: number; subjectName: string }[]
    expect(items.map((r) => r.id)).toContain(smallRun.id)
    expect(items.find((r) => r.id === smallRun.id)!.subjectName).toBe('Synthetic test motion')
    const times = items.map((r) => r.createdAt)
    expect(times).toEqual([...times].sort((a, b) => b - a))
  })

  it('filters by record and by project', async () => {
    const another = insertRecord(
      ctx.db,
      { firmId, projectId, uploadedBy: ctx.seed.userIds['engineer@ordinate.test']! },
      { name: 'Second motion', points: 400 },
    )
    const run = await runToEnd(engineer, { recordId: another.id, ...SMALL_JOB })
    const byRecord = await engineer.get('/api/runs').query({ recordId: another.id })
    expect(byRecord.body.items.map((r: { id: string }) => r.id)).toEqual([run.id])
    const byProject = await engineer.get('/api/runs').query({ projectId })
    expect(byProject.body.items.length).toBeGreaterThan(1)
  })

  it("shows another firm none of this firm's runs", async () => {
    const res = await outsider.get('/api/runs')
    expect(res.status).toBe(200)
    expect(res.body.items.map((r: { id: string }) => r.id)).not.toContain(smallRun.id)
  })

  it('answers 400 for a malformed filter and 401 when signed out', async () => {
    expect((await engineer.get('/api/runs').query({ recordId: 'nope' })).status).toBe(400)
    expect((await ctx.anonymous().get('/api/runs')).status).toBe(401)
  })
})

describe('GET /api/runs/:id', () => {
  it.each([
    ['engineer', () => engineer],
    ['checker', () => checker],
    ['admin', () => admin],
  ])('answers the run to the %s', async (_role, agent) => {
    const res = await agent().get(`/api/runs/${smallRun.id}`)
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({
      id: smallRun.id,
      status: 'succeeded',
      pairId: null,
      createdBy: { name: 'Ines Marlowe' },
    })
  })

  it("answers 404 for another firm's run, 400 for a malformed id and 401 when signed out", async () => {
    expect((await outsider.get(`/api/runs/${smallRun.id}`)).status).toBe(404)
    expect((await engineer.get('/api/runs/not-an-id')).status).toBe(400)
    expect((await ctx.anonymous().get(`/api/runs/${smallRun.id}`)).status).toBe(401)
  })
})

describe('GET /api/runs/:id/spectrum', () => {
  it('answers the engine JSON shape (spectrumResultSchema) with the run settings under settings', async () => {
    const res = await checker.get(`/api/runs/${smallRun.id}/spectrum`)
    expect(res.status).toBe(200)
    const parsed = spectrumResultSchema.parse(res.body)
    expect(parsed.settings).toEqual(smallRun.settings)
    expect(parsed.record).toMatchObject({ points: 1500, dtS: 0.01, sourceUnits: 'm/s2' })
    expect(parsed.methodStatement.method).toBe('newmark-average')
  })

  /** Uploads the demo far-field record through the records service; answers it parsed as well. */
  function uploadDemoRecord() {
    const demo = demoRecord('synthetic-far-field')
    const uploaded = createRecord(
      ctx.db,
      ctx.dataDir,
      { firmId, userId: ctx.seed.userIds['engineer@ordinate.test']! },
      { bytes: Buffer.from(demo.text), fileName: demo.fileName, synthetic: true },
    )
    return { uploaded, parsed: parseRecord(demo.text) }
  }

  /** What the command-line path (parse, compute in one call, toSpectrumJson) gives for a parsed file. */
  function commandLineSpectrum(parsed: ReturnType<typeof parseRecord>, settings: SpectrumSettings) {
    return toSpectrumJson(
      { ...recordParameters(parsed.accelMPerS2, parsed.dtS), sourceUnits: parsed.sourceUnits },
      computeSpectrum({ accelMPerS2: parsed.accelMPerS2, dtS: parsed.dtS }, settings),
      recordWarnings(parsed.accelMPerS2, parsed.dtS),
    )
  }

  it('equals, bit for bit, what the command-line path (parse, compute, toSpectrumJson) gives for the same file', async () => {
    const { uploaded, parsed } = uploadDemoRecord()
    const settings = {
      dampingRatios: [0.02, 0.05],
      periodsS: [0.01, 0.1, 0.25, 1, 3, 10],
      method: 'piecewise-exact' as const,
    }
    const run = await runToEnd(engineer, { recordId: uploaded.id, ...settings })
    const api = (await engineer.get(`/api/runs/${run.id}/spectrum`)).body

    const local = commandLineSpectrum(parsed, settings)
    const { settings: _settings, ...fromApi } = api
    // JSON keeps every double exactly (shortest round-trip form), so equality is bit for bit.
    expect(fromApi.curves).toEqual(local.curves)
    expect(fromApi.periodsS).toEqual(local.periodsS)
    expect(fromApi.methodStatement).toEqual(local.methodStatement)
    expect(fromApi.record).toEqual(local.record)
  })

  it('splits a large run over both threads when nothing else waits, and the result equals, bit for bit, the whole record computed in one call', async () => {
    const { uploaded, parsed } = uploadDemoRecord()
    // The standard job of the benchmark: the default grid, four damping ratios, average acceleration.
    const settings = {
      dampingRatios: [0.02, 0.05, 0.1, 0.2],
      periodsS: Array.from(defaultPeriodsS()),
      method: 'newmark-average' as const,
    }
    expect(
      planRunParts(
        { kind: 'record', dtS: parsed.dtS, samples: parsed.accelMPerS2.slice().buffer },
        settings,
        2,
      ),
    ).toHaveLength(2)

    const res = await engineer
      .post('/api/runs')
      .send({ recordId: uploaded.id, dampingRatios: settings.dampingRatios })
    expect(res.status).toBe(202)
    // Every thread seen computing a part of the run (the parts may not overlap in time on a busy machine).
    const threadIds = new Set<number>()
    const progress: number[] = []
    queue.subscribe(res.body.id, (event) => {
      if (event.type !== 'progress') return
      progress.push(event.progress)
      for (const worker of queue.workersFor(res.body.id)) threadIds.add(worker.threadId)
    })
    expect(await runFinished(queue, ctx.db, res.body.id)).toMatchObject({ status: 'succeeded' })
    expect(threadIds.size).toBe(2)
    expect(progress).toEqual([...progress].sort((a, b) => a - b))
    const run = (await engineer.get(`/api/runs/${res.body.id}`)).body
    expect(run.settings.periodsS).toEqual(settings.periodsS)
    expect(run.timings.parts).toBe(2)
    const api = (await engineer.get(`/api/runs/${res.body.id}/spectrum`)).body

    const local = commandLineSpectrum(parsed, settings)
    const { settings: _settings, ...fromApi } = api
    // JSON keeps every double exactly (shortest round-trip form), so equality is bit for bit.
    expect(fromApi).toEqual(local)
  })

  it('answers 409 for a run that has not succeeded', async () => {
    const id = insertRunRow({ status: 'failed', error: 'test' })
    const res = await engineer.get(`/api/runs/${id}/spectrum`)
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('run_not_finished')
  })

  it("answers 404 for another firm's run and 401 when signed out", async () => {
    expect((await outsider.get(`/api/runs/${smallRun.id}/spectrum`)).status).toBe(404)
    expect((await ctx.anonymous().get(`/api/runs/${smallRun.id}/spectrum`)).status).toBe(401)
  })
})

describe('GET /api/runs/:id/spectrum.csv', () => {
  it('is the run’s CSV export: labelled data (product, record and SHA-256, source units, method, caution), one row per period', async () => {
    const res = await admin.get(`/api/runs/${smallRun.id}/spectrum.csv`)
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8')
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="?[\w.-]+-rev1-[\w-]+\.csv"?$/)
    const exported = await admin.get(`/api/runs/${smallRun.id}/export.csv`)
    expect(res.text).toBe(exported.text)
    const lines = res.text.trimEnd().split('\r\n')
    const header = lines.filter((l) => l.startsWith('#')).join('\n')
    expect(header).toMatch(/^# Ordinate \d+\.\d+\.\d+/)
    expect(header).toContain('Synthetic test motion')
    expect(header).toContain(`SHA-256 ${record.sha256}`)
    expect(header).toContain('# Source units: m/s2, converted to m/s2')
    expect(header).toMatch(/Solver: Newmark-β, average acceleration/)
    expect(header).toMatch(/Δt = 0\.01 s; sub-steps per oscillator: \d+/)
    expect(header).toMatch(
      /Caution: Ordinate is a calculation aid; the licensed engineer of record is responsible/,
    )
    const rows = lines.filter((l) => !l.startsWith('#'))
    const columns = rows[0]!.split(',')
    expect(columns.slice(0, 7)).toEqual([
      'period_s',
      'sd_m_zeta0.05',
      'sv_m_per_s_zeta0.05',
      'sa_m_per_s2_zeta0.05',
      'psv_m_per_s_zeta0.05',
      'psa_m_per_s2_zeta0.05',
      'psa_g_zeta0.05',
    ])
    expect(columns).toContain('psa_g_zeta0.1')
    expect(rows).toHaveLength(1 + SMALL_JOB.periodsS.length)
    const spectrum = (await admin.get(`/api/runs/${smallRun.id}/spectrum`)).body
    const first = rows[1]!.split(',').map(Number)
    expect(first[0]).toBe(SMALL_JOB.periodsS[0])
    expect(first[columns.indexOf('sd_m_zeta0.1')]).toBe(spectrum.curves[1].sdM[0])
    const psa = spectrum.curves[1].psaMPerS2[0]
    expect(first[columns.indexOf('psa_m_per_s2_zeta0.1')]).toBe(psa)
    expect(first[columns.indexOf('psa_g_zeta0.1')]).toBeCloseTo(psa / 9.80665, 15) // g = 9.80665 m/s² (3rd CGPM, 1901)
  })

  it('names no combination for a single record', async () => {
    const res = await engineer.get(`/api/runs/${smallRun.id}/spectrum.csv`)
    expect(res.text).not.toMatch(/RotD|Geometric mean|rotd|geomean/)
  })

  it('has one column per damping, combination and quantity for a record pair, labelled as the legend is, with each component’s source units', async () => {
    const owner = { firmId, projectId, uploadedBy: ctx.seed.userIds['engineer@ordinate.test']! }
    const h1 = insertRecord(ctx.db, owner, { name: 'Pair H1 (synthetic)', points: 400 })
    const h2 = insertRecord(ctx.db, owner, {
      name: 'Pair H2 (synthetic)',
      samples: syntheticMotion(400, 0.01).reverse(),
    })
    ctx.db.update(records).set({ sourceUnits: 'cm/s2' }).where(eq(records.id, h2.id)).run()
    const pair = await engineer
      .post('/api/record-pairs')
      .send({ recordIds: [h1.id, h2.id], name: 'Synthetic CSV pair' })
    expect(pair.status).toBe(201)
    const run = await runToEnd(engineer, {
      pairId: pair.body.id,
      combinations: ['geomean', 'rotd100'],
      dampingRatios: [0.05],
      periodsS: [1, 0.2],
    })
    expect(run.status).toBe('succeeded')
    const csv = await engineer.get(`/api/runs/${run.id}/spectrum.csv`)
    const lines = csv.text.trimEnd().split('\r\n')
    expect(lines).toContain(
      '# Source units: Pair H1 (synthetic) m/s2; Pair H2 (synthetic) cm/s2; each converted to m/s2',
    )
    const rows = lines.filter((l) => !l.startsWith('#'))
    const columns = rows[0]!.split(',')
    expect(columns.filter((c) => c.startsWith('psa_g'))).toEqual([
      'psa_g_zeta0.05_Geometric mean',
      'psa_g_zeta0.05_RotD100',
    ])
    expect(columns).toHaveLength(1 + 2 * 6)
    expect(rows.slice(1).map((r) => Number(r.split(',')[0]))).toEqual([0.2, 1])
  })

  it("answers 404 for another firm's run and 401 when signed out", async () => {
    expect((await outsider.get(`/api/runs/${smallRun.id}/spectrum.csv`)).status).toBe(404)
    expect((await ctx.anonymous().get(`/api/runs/${smallRun.id}/spectrum.csv`)).status).toBe(401)
  })
})

describe('GET /api/runs/:id/events', () => {
  it('streams progress and then the final status, and closes', async () => {
    const res = await engineer
      .post('/api/runs')
      // Enough work (4,000 oscillators) for the sweep to report progress several times.
      .send({
        recordId: record.id,
        dampingRatios: [0.02, 0.05, 0.1, 0.2],
        periodGrid: { minS: 0.01, maxS: 20, count: 1000 },
      })
    const stream = await engineer.get(`/api/runs/${res.body.id}/events`).buffer(true)
    expect(stream.status).toBe(200)
    expect(stream.headers['content-type']).toMatch(/^text\/event-stream/)
    const events = parseServerEvents(stream.text)
    expect(events[0]!.event).toBe('status')
    const progress = events.filter((e) => e.event === 'progress').map((e) => e.data.progress as number)
    expect(progress.length).toBeGreaterThan(0)
    expect(progress).toEqual([...progress].sort((a, b) => a - b))
    expect(progress.every((p) => p > 0 && p < 1)).toBe(true)
    expect(events.at(-1)).toMatchObject({
      event: 'status',
      data: { status: 'succeeded', progress: 1, error: null },
    })
  })

  it('answers a finished run with its status alone', async () => {
    const stream = await checker.get(`/api/runs/${smallRun.id}/events`).buffer(true)
    expect(parseServerEvents(stream.text)).toEqual([
      { event: 'status', data: { runId: smallRun.id, status: 'succeeded', progress: 1, error: null } },
    ])
  })

  it('stops listening when the client goes away', async () => {
    // A run no queue will take, so its stream stays open until the client leaves.
    const id = insertRunRow({ status: 'running', attempts: 1 })
    const server = ctx.app.listen(0, '127.0.0.1')
    await new Promise((resolve) => server.once('listening', resolve))
    try {
      const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
      const signIn = await fetch(`${base}/api/auth/sign-in`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', 'x-ordinate-client': '1' },
        body: JSON.stringify({ email: 'engineer@ordinate.test', password: 'ordinate-demo' }),
      })
      const cookie = signIn.headers.get('set-cookie')!.split(';')[0]!
      const abort = new AbortController()
      const res = await fetch(`${base}/api/runs/${id}/events`, { headers: { cookie }, signal: abort.signal })
      const first = await res.body!.getReader().read()
      expect(new TextDecoder().decode(first.value)).toMatch(/event: status/)
      expect(queue.subscriberCount(id)).toBe(1)
      abort.abort()
      await vi.waitFor(() => expect(queue.subscriberCount(id)).toBe(0))
    } finally {
      server.closeAllConnections()
      server.close()
      ctx.db.update(runs).set({ status: 'failed', error: 'test' }).where(eq(runs.id, id)).run()
    }
  })

  it("answers 404 for another firm's run and 401 when signed out", async () => {
    expect((await outsider.get(`/api/runs/${smallRun.id}/events`)).status).toBe(404)
    expect((await ctx.anonymous().get(`/api/runs/${smallRun.id}/events`)).status).toBe(401)
  })
})
