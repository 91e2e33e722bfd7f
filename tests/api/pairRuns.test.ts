import { eq } from 'drizzle-orm'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { recordPairs, records, runs } from '../../server/db/schema.js'
import { newId } from '../../server/ids.js'
import type { RunQueue } from '../../server/runs/runQueue.js'
import { creditBalance } from '../../server/services/credits.js'
import { computeSpectrum } from '../../shared/spectra/computeSpectrum.js'
import {
  engineerUpload,
  insertRecord,
  runFinished,
  setCredits,
  startRunQueue,
  syntheticMotion,
} from '../support/runFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let queue: RunQueue
let engineer: request.Agent
let checker: request.Agent
let outsider: request.Agent
let firmId: string
let pairId: string
let polarisedPairId: string
let recordId: string
const dtS = 0.01
const a1 = syntheticMotion(500, dtS)
const a2 = Float64Array.from(
  syntheticMotion(500, dtS),
  (v, i) => 0.7 * v * Math.cos(i * 0.013) + 0.2 * Math.sin(i * 0.07),
)
const periodsS = [0.1, 0.3, 0.8, 2]

const finished = async (runId: string) => (await runFinished(queue, ctx.db, runId)).status

function insertPair(name: string, first: Float64Array, second: Float64Array): string {
  const owner = engineerUpload(ctx.seed)
  const r1 = insertRecord(ctx.db, owner, { name: `${name} H1 (synthetic)`, samples: first, dtS })
  const r2 = insertRecord(ctx.db, owner, { name: `${name} H2 (synthetic)`, samples: second, dtS })
  const id = newId()
  ctx.db
    .insert(recordPairs)
    .values({
      id,
      firmId,
      projectId: owner.projectId,
      name,
      record1Id: r1.id,
      record2Id: r2.id,
      createdBy: owner.uploadedBy,
    })
    .run()
  return id
}

beforeAll(async () => {
  ctx = await createTestContext()
  queue = startRunQueue(ctx, { workerCount: 1, runTimeLimitS: 120, idleMs: 5000 })
  firmId = ctx.seed.firmIds[0] as string
  setCredits(ctx.db, firmId, 20)
  pairId = insertPair('Synthetic pair', a1, a2)
  const th = (30 * Math.PI) / 180
  polarisedPairId = insertPair(
    'Synthetic polarised pair',
    a1.map((v) => v * Math.cos(th)),
    a1.map((v) => v * Math.sin(th)),
  )
  recordId = insertRecord(ctx.db, engineerUpload(ctx.seed), { name: 'Synthetic single', samples: a1, dtS }).id
  ;[engineer, checker, outsider] = await Promise.all([
    ctx.signIn('engineer@ordinate.test'),
    ctx.signIn('checker@ordinate.test'),
    ctx.signIn('outsider@ordinate.test'),
  ])
})
afterAll(async () => {
  await queue.stop(0)
  ctx.close()
})

describe('POST /api/runs with a record pair', () => {
  let runId: string

  it('queues a two-component run for one credit (202)', async () => {
    const before = creditBalance(ctx.db, firmId)
    const res = await engineer
      .post('/api/runs')
      .send({ pairId, combinations: ['geomean', 'rotd50', 'rotd100'], dampingRatios: [0.05], periodsS })
    expect(res.status).toBe(202)
    expect(res.body).toMatchObject({
      pairId,
      recordId: null,
      status: 'queued',
      subjectName: 'Synthetic pair',
      revision: 1,
      reviewState: 'draft',
    })
    expect(res.body.settings.combinations).toEqual(['geomean', 'rotd50', 'rotd100'])
    expect(creditBalance(ctx.db, firmId)).toBe(before - 1)
    runId = res.body.id
    expect(await finished(runId)).toBe('succeeded')
  })

  it('answers a spectrum whose curves are tagged with their combination, computed on a worker thread as the engine does', async () => {
    const res = await engineer.get(`/api/runs/${runId}/spectrum`)
    expect(res.status).toBe(200)
    expect(res.body.curves.map((c: { combination: string }) => c.combination)).toEqual([
      'geomean',
      'rotd50',
      'rotd100',
    ])
    expect(res.body.methodStatement.combinationRule).toMatch(/Boore 2010/)
    expect(res.body.pair.components.map((c: { name: string }) => c.name)).toEqual([
      'Synthetic pair H1 (synthetic)',
      'Synthetic pair H2 (synthetic)',
    ])
    // The same inputs give the same numbers: the pair sweep called directly.
    const direct = computeSpectrum(
      { accel1MPerS2: a1, accel2MPerS2: a2, dtS },
      {
        dampingRatios: [0.05],
        periodsS,
        method: 'newmark-average',
        combinations: ['geomean', 'rotd50', 'rotd100'],
      },
    )
    direct.curves.forEach((curve, i) => {
      expect(res.body.curves[i].psaMPerS2).toEqual(Array.from(curve.psaMPerS2))
      expect(res.body.curves[i].sdM).toEqual(Array.from(curve.sdM))
    })
    const [, rotd50, rotd100] = res.body.curves
    periodsS.forEach((_, p) => expect(rotd50.psaMPerS2[p]).toBeLessThanOrEqual(rotd100.psaMPerS2[p]))
  })

  it('for a polarised pair, RotD50 = cos45° × RotD100 at every period (Boore 2010 closed form)', async () => {
    const res = await checker
      .post('/api/runs')
      .send({ pairId: polarisedPairId, combinations: ['rotd50', 'rotd100'], dampingRatios: [0.05], periodsS })
    expect(res.status).toBe(202)
    expect(await finished(res.body.id)).toBe('succeeded')
    const spectrum = (await checker.get(`/api/runs/${res.body.id}/spectrum`)).body
    const [rotd50, rotd100] = spectrum.curves
    periodsS.forEach((_, p) =>
      expect(rotd50.psaMPerS2[p] / rotd100.psaMPerS2[p]).toBeCloseTo(Math.SQRT1_2, 12),
    )
  })

  it('a single-record run’s curves carry no combination', async () => {
    const res = await engineer.post('/api/runs').send({ recordId, dampingRatios: [0.05], periodsS })
    expect(res.status).toBe(202)
    expect(await finished(res.body.id)).toBe('succeeded')
    const spectrum = (await engineer.get(`/api/runs/${res.body.id}/spectrum`)).body
    expect(spectrum.curves).toHaveLength(1)
    expect(spectrum.curves[0]).not.toHaveProperty('combination')
  })

  it('refuses bad combinations, a recordId beside the pairId and another firm’s pair, spending nothing', async () => {
    const before = creditBalance(ctx.db, firmId)
    const unknown = await engineer.post('/api/runs').send({ pairId, combinations: ['rotd75'] })
    expect(unknown.status).toBe(400)
    expect(unknown.body.error.message).toMatch(/combination/)
    expect((await engineer.post('/api/runs').send({ pairId, combinations: [] })).status).toBe(400)
    expect(
      (await engineer.post('/api/runs').send({ pairId, combinations: ['rotd50', 'rotd50'] })).status,
    ).toBe(400)
    expect(
      (await engineer.post('/api/runs').send({ pairId, recordId, combinations: ['rotd50'] })).status,
    ).toBe(400)
    expect((await outsider.post('/api/runs').send({ pairId, combinations: ['rotd50'] })).status).toBe(404)
    expect(creditBalance(ctx.db, firmId)).toBe(before)
  })
})

describe('run revisions and review state in the runs list', () => {
  it('a re-run of a checked run is a new revision of the same subject', async () => {
    const first = await engineer.post('/api/runs').send({ recordId, dampingRatios: [0.05], periodsS })
    expect(await finished(first.body.id)).toBe('succeeded')
    const submitted = await engineer
      .post('/api/reviews')
      .send({ subjectType: 'run', subjectId: first.body.id })
    expect(submitted.status).toBe(201)
    expect(
      (await checker.post(`/api/reviews/${submitted.body.id}/decision`).send({ decision: 'checked' })).status,
    ).toBe(200)
    const list = await engineer.get('/api/runs')
    expect(list.body.items.find((r: { id: string }) => r.id === first.body.id).reviewState).toBe('checked')
    const again = await engineer
      .post('/api/runs')
      .send({ recordId, dampingRatios: [0.05], periodsS, revisionOf: first.body.id })
    expect(again.status).toBe(202)
    expect(again.body).toMatchObject({ revision: 2, revisionOf: first.body.id, reviewState: 'draft' })
  })

  it('refuses a revision of a run of another record (400) or an unknown run (404)', async () => {
    const pairRun = (await engineer.get('/api/runs')).body.items.find(
      (r: { pairId: string | null }) => r.pairId === pairId,
    )
    const mismatch = await engineer
      .post('/api/runs')
      .send({ recordId, dampingRatios: [0.05], periodsS, revisionOf: pairRun.id })
    expect(mismatch.status).toBe(400)
    expect(mismatch.body.error.code).toBe('revision_subject_mismatch')
    expect((await engineer.post('/api/runs').send({ recordId, revisionOf: newId() })).status).toBe(404)
  })
})

describe("a record's runs include the runs of its pairs (issue 12, defect 3)", () => {
  it('GET /api/runs?recordId= lists the pair runs, as many as deleting the record reports', async () => {
    const pair = ctx.db
      .select({ record1Id: recordPairs.record1Id })
      .from(recordPairs)
      .where(eq(recordPairs.id, pairId))
      .get()!
    const pairRunIds = ctx.db
      .select({ id: runs.id })
      .from(runs)
      .where(eq(runs.pairId, pairId))
      .all()
      .map((r) => r.id)
    expect(pairRunIds.length).toBeGreaterThan(0)
    const list = await engineer.get('/api/runs').query({ recordId: pair.record1Id })
    expect(list.status).toBe(200)
    const listed = list.body.items.map((r: { id: string }) => r.id)
    expect([...listed].sort()).toEqual([...pairRunIds].sort())
    expect(list.body.items.every((r: { pairId: string | null }) => r.pairId === pairId)).toBe(true)

    const refused = await engineer.delete(`/api/records/${pair.record1Id}`)
    expect(refused.status).toBe(409)
    const count = listed.length === 1 ? 'a run' : `${listed.length} runs`
    expect(refused.body.error.message).toContain(`used by ${count}`)
  })

  it("another firm's member sees none of them", async () => {
    const pair = ctx.db
      .select({ record1Id: recordPairs.record1Id })
      .from(recordPairs)
      .where(eq(recordPairs.id, pairId))
      .get()!
    const res = await outsider.get('/api/runs').query({ recordId: pair.record1Id })
    expect(res.body.items).toEqual([])
  })
})

describe('the paperwork of a pair whose components came in different units (issue 12, defect 3)', () => {
  let runId: string

  beforeAll(async () => {
    const mixedPairId = insertPair('Synthetic mixed-units pair', a1, a2)
    const pair = ctx.db.select().from(recordPairs).where(eq(recordPairs.id, mixedPairId)).get()!
    // The samples are stored in SI either way; the second file is recorded as read in cm/s².
    ctx.db.update(records).set({ sourceUnits: 'cm/s2' }).where(eq(records.id, pair.record2Id)).run()
    const res = await engineer
      .post('/api/runs')
      .send({ pairId: mixedPairId, combinations: ['rotd50'], dampingRatios: [0.05], periodsS })
    expect(res.status).toBe(202)
    runId = res.body.id
    expect(await finished(runId)).toBe('succeeded')
  })

  it('the method statement names no internal function (it once said "(planSpectrum)")', async () => {
    const res = await engineer.get(`/api/runs/${runId}/spectrum`)
    const text = Object.values(res.body.methodStatement).filter((v) => typeof v === 'string')
    expect(text.length).toBeGreaterThan(0)
    for (const line of text) expect(line).not.toMatch(/\b[a-z]+[A-Z][A-Za-z]*\b/)
  })

  it("the spectrum names each component's source units", async () => {
    const res = await engineer.get(`/api/runs/${runId}/spectrum`)
    expect(res.body.pair.components.map((c: { sourceUnits: string }) => c.sourceUnits)).toEqual([
      'm/s2',
      'cm/s2',
    ])
  })

  it("the CSV and the sheet state each component's units, not one for both", async () => {
    const csv = await engineer.get(`/api/runs/${runId}/export.csv`)
    expect(csv.status).toBe(200)
    expect(csv.text).toContain('Synthetic mixed-units pair H1 (synthetic) m/s2')
    expect(csv.text).toContain('Synthetic mixed-units pair H2 (synthetic) cm/s2')
    const sheet = await engineer.get(`/api/runs/${runId}/sheet`)
    const processing = sheet.body.records.map(
      (r: { fields: { label: string; value: string }[] }) =>
        r.fields.find((f) => f.label === 'Processing')?.value,
    )
    expect(processing).toEqual([
      expect.stringMatching(/read in m\/s²/),
      expect.stringMatching(/Converted from cm\/s² \(gal\) to m\/s²/),
    ])
  })
})
