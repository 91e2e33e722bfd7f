import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type request from 'supertest'
import { auditLog, recordPairs, reviews, runs } from '../../server/db/schema.js'
import { insertSucceededRun, markRunQueued } from '../support/comparisonFixtures.js'
import { createTestContext, signInDemoMembers, type TestContext } from '../support/testApp.js'

// The fixture spectra are the hand-worked suite of shared/spectra/suite.test.ts:
// periods 0.5, 1, 2 s; run A PSA = [1, 1, 1] g, run B PSA = [1, 3, 1] g; target [1, 2, 4] g.

let ctx: TestContext
let engineer: request.Agent
let checker: request.Agent
let admin: request.Agent
let outsider: request.Agent
let runA: string
let runB: string
let queuedRun: string
const periodsS = [0.5, 1, 2]
const target = { kind: 'user', periodsS: [0.5, 1, 2], saG: [1, 2, 4] }

beforeAll(async () => {
  ctx = await createTestContext()
  const owner = {
    firmId: ctx.seed.firmIds[0] as string,
    projectId: ctx.seed.projectIds[0] as string,
    userId: ctx.seed.userIds['engineer@ordinate.test'] as string,
  }
  runA = insertSucceededRun(ctx.db, owner, {
    name: 'Synthetic motion A',
    periodsS,
    curves: [
      { dampingRatio: 0.05, psaG: [1, 1, 1] },
      { dampingRatio: 0.02, psaG: [2, 2, 2] },
    ],
  })
  runB = insertSucceededRun(ctx.db, owner, {
    name: 'Synthetic motion B',
    periodsS,
    curves: [{ dampingRatio: 0.05, psaG: [1, 3, 1] }],
  })
  queuedRun = insertSucceededRun(ctx.db, owner, {
    name: 'Synthetic motion C',
    periodsS,
    curves: [{ dampingRatio: 0.05, psaG: [1, 1, 1] }],
  })
  markRunQueued(ctx.db, queuedRun)
  ;({ engineer, checker, admin, outsider } = await signInDemoMembers(ctx))
})
afterAll(() => ctx.close())

describe('POST /api/comparisons', () => {
  it('saves a comparison and answers its chart and table data (suite-90: one factor 3.6, passing)', async () => {
    const res = await engineer.post('/api/comparisons').send({
      name: 'Suite against site target',
      runIds: [runA, runB],
      dampingRatio: 0.05,
      target,
      scaling: { fromS: 0.5, toS: 2, rule: 'suite-90' },
    })
    expect(res.status).toBe(201)
    const view = res.body
    expect(view.comparison.reviewState).toBe('draft')
    expect(view.periodsS).toEqual(periodsS)
    expect(view.curves.map((c: { label: string }) => c.label)).toEqual([
      'Synthetic motion A',
      'Synthetic motion B',
    ])
    expect(view.curves[1].psaG.map((v: number) => Number(v.toFixed(12)))).toEqual([1, 3, 1])
    // Arithmetic mean [1, 2, 1]; σ at 1 s: deviations ±1 → √(2/1) = 1.414214.
    expect(view.suite.unscaled.meanG).toEqual([1, 2, 1].map((v) => expect.closeTo(v, 12)))
    expect(view.suite.unscaled.upperG[1]).toBeCloseTo(2 + Math.SQRT2, 12)
    // F = max(0.9·target/mean) = max(0.9, 0.9, 3.6) = 3.6, governing at 2 s, mean/target = 0.9 there.
    expect(view.curves.map((c: { scaleFactor: number }) => c.scaleFactor)).toEqual(
      [3.6, 3.6].map((v) => expect.closeTo(v, 12)),
    )
    expect(view.scaling.check).toMatchObject({ passed: true, governingPeriodS: 2 })
    expect(view.scaling.check.minRatio).toBeCloseTo(0.9, 12)
    expect(view.suite.scaled.meanG[1]).toBeCloseTo(7.2, 12)
    expect(view.target.target90G).toEqual([0.9, 1.8, 3.6].map((v) => expect.closeTo(v, 12)))
    expect(view.scaling.ruleLabel).toMatch(/90%/)
    expect(view.caution).toMatch(/engineer of record/)
    expect(view.caution).not.toMatch(/complies/)
  })

  it('scales each record by least squares in log space and fails the 90% check', async () => {
    // A: f = 2; B: f = (8/3)^(1/3) = 1.386722; scaled mean at 2 s = 1.693361 → 0.423 of target: fail.
    const res = await engineer.post('/api/comparisons').send({
      name: 'Least squares',
      runIds: [runA, runB],
      dampingRatio: 0.05,
      target,
      scaling: { fromS: 0.5, toS: 2, rule: 'lsq-log' },
    })
    expect(res.status).toBe(201)
    expect(res.body.curves[0].scaleFactor).toBeCloseTo(2, 12)
    expect(res.body.curves[1].scaleFactor).toBeCloseTo((8 / 3) ** (1 / 3), 12)
    expect(res.body.scaling.check.passed).toBe(false)
    expect(res.body.scaling.check.minRatio).toBeCloseTo(0.42334, 5)
  })

  it('draws the geometric mean with ±1σ of ln PSA', async () => {
    // At 1 s: ln 1 = 0 and ln 3 → μ = ln3/2, mean √3; σ = √(2·(ln3/2)²) = ln3/√2.
    const res = await checker
      .post('/api/comparisons')
      .send({ name: 'Geometric', runIds: [runA, runB], dampingRatio: 0.05, meanKind: 'geometric' })
    expect(res.status).toBe(201)
    const s = res.body.suite.unscaled
    expect(s.meanG[1]).toBeCloseTo(Math.sqrt(3), 12)
    expect(s.upperG[1]).toBeCloseTo(Math.exp(Math.log(3) / 2 + Math.log(3) / Math.SQRT2), 12)
    expect(s.label).toMatch(/ln PSA/)
    expect(res.body.target).toBeNull()
    expect(res.body.scaling).toBeNull()
  })

  it('uses a saved target by id', async () => {
    const saved = await engineer.post('/api/targets').send({ name: 'Saved user target', definition: target })
    const res = await engineer
      .post('/api/comparisons')
      .send({ name: 'With saved', runIds: [runA], dampingRatio: 0.05, target: { targetId: saved.body.id } })
    expect(res.status).toBe(201)
    expect(res.body.comparison.target.targetId).toBe(saved.body.id)
    expect(res.body.target.label).toMatch(/^Saved user target/)
  })

  it('compares a pair run by the combination asked for, RotD100 by default', async () => {
    const owner = {
      firmId: ctx.seed.firmIds[0] as string,
      projectId: ctx.seed.projectIds[0] as string,
      userId: ctx.seed.userIds['engineer@ordinate.test'] as string,
    }
    const pairRun = insertSucceededRun(ctx.db, owner, {
      name: 'Synthetic pair P',
      periodsS,
      pair: true,
      curves: [
        { dampingRatio: 0.05, combination: 'rotd50', psaG: [0.5, 0.5, 0.5] },
        { dampingRatio: 0.05, combination: 'rotd100', psaG: [0.8, 0.8, 0.8] },
      ],
    })
    const byDefault = await engineer
      .post('/api/comparisons')
      .send({ name: 'Pair default', runIds: [pairRun, runA], dampingRatio: 0.05 })
    expect(byDefault.status).toBe(201)
    expect(byDefault.body.curves[0]).toMatchObject({
      combination: 'rotd100',
      label: 'Synthetic pair P, RotD100',
    })
    expect(byDefault.body.curves[0].psaG[0]).toBeCloseTo(0.8, 12)
    expect(byDefault.body.curves[1]).not.toHaveProperty('combination')
    expect(byDefault.body.labels.combination).toMatch(/RotD100/)
    const rotd50 = await engineer
      .post('/api/comparisons')
      .send({ name: 'Pair 50', runIds: [pairRun], dampingRatio: 0.05, combination: 'rotd50' })
    expect(rotd50.body.curves[0].psaG[0]).toBeCloseTo(0.5, 12)
    const missing = await engineer
      .post('/api/comparisons')
      .send({ name: 'Pair gm', runIds: [pairRun], dampingRatio: 0.05, combination: 'geomean' })
    expect(missing.status).toBe(400)
    expect(missing.body.error.code).toBe('combination_not_in_run')
  })

  it('cautions when a record is counted twice and when the suite is smaller than the code usually asks for', async () => {
    const owner = {
      firmId: ctx.seed.firmIds[0] as string,
      projectId: ctx.seed.projectIds[0] as string,
      userId: ctx.seed.userIds['engineer@ordinate.test'] as string,
    }
    const curves = [{ dampingRatio: 0.05, combination: 'rotd100' as const, psaG: [0.8, 0.8, 0.8] }]
    const pairRun = insertSucceededRun(ctx.db, owner, {
      name: 'Synthetic pair Q',
      periodsS,
      pair: true,
      curves,
    })
    const pair = ctx.db.select().from(runs).where(eq(runs.id, pairRun)).get()!
    const component = ctx.db.select().from(recordPairs).where(eq(recordPairs.id, pair.pairId!)).get()!
    const alone = insertSucceededRun(ctx.db, owner, {
      name: 'Synthetic pair Q, first component',
      periodsS,
      recordId: component.record1Id,
      curves: [{ dampingRatio: 0.05, psaG: [0.6, 0.6, 0.6] }],
    })
    const asce = { kind: 'asce7-two-period', sdsG: 1, sd1G: 0.6, tlS: 8 }
    const res = await engineer
      .post('/api/comparisons/preview')
      .send({ name: 'Suite Q', runIds: [pairRun, alone], dampingRatio: 0.05, target: asce })
    expect(res.status).toBe(200)
    expect(res.body.suiteCautions).toHaveLength(2)
    expect(res.body.suiteCautions[0]).toMatch(
      /is counted 2 times in this suite \(inside the pair .*; alone as /,
    )
    // ASCE 7: at least 11 ground motions; from memory, as the caution says.
    expect(res.body.suiteCautions[1]).toMatch(/has 2 of the 11 ground motions .* ASCE 7 usually asks for/)
    // A suite of distinct records with no code target has nothing to caution about.
    const plain = await engineer
      .post('/api/comparisons/preview')
      .send({ runIds: [runA, runB], dampingRatio: 0.05 })
    expect(plain.body.suiteCautions).toEqual([])
  })

  it('responds 400 when a run has no curve at the damping ratio', async () => {
    const res = await engineer
      .post('/api/comparisons')
      .send({ name: 'x', runIds: [runA, runB], dampingRatio: 0.02 })
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('damping_not_in_run')
    expect(res.body.error.message).toMatch(/Synthetic motion B/)
  })

  it('responds 409 when a run has not finished', async () => {
    const res = await engineer
      .post('/api/comparisons')
      .send({ name: 'x', runIds: [runA, queuedRun], dampingRatio: 0.05 })
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('run_not_finished')
  })

  it('responds 400 to scaling without a target and to a range where the target is undefined', async () => {
    const noTarget = await engineer
      .post('/api/comparisons')
      .send({ name: 'x', runIds: [runA], dampingRatio: 0.05, scaling: { fromS: 0.5, toS: 2 } })
    expect(noTarget.status).toBe(400)
    expect(noTarget.body.error.message).toMatch(/target/)
    const beyond = await engineer.post('/api/comparisons').send({
      name: 'x',
      runIds: [runA],
      dampingRatio: 0.05,
      target: { kind: 'user', periodsS: [0.5, 1], saG: [1, 1] },
      scaling: { fromS: 0.5, toS: 2, rule: 'lsq-log' },
    })
    expect(beyond.status).toBe(400)
    expect(beyond.body.error.message).toMatch(/not defined at T = 2 s/)
  })

  it('responds 400 to a reversed range and to duplicate runs', async () => {
    const reversed = await engineer
      .post('/api/comparisons')
      .send({ name: 'x', runIds: [runA], dampingRatio: 0.05, target, scaling: { fromS: 2, toS: 1 } })
    expect(reversed.status).toBe(400)
    const dup = await engineer
      .post('/api/comparisons')
      .send({ name: 'x', runIds: [runA, runA], dampingRatio: 0.05 })
    expect(dup.status).toBe(400)
  })

  it('answers 404 for another firm’s run and 403 for an admin who is not an engineer', async () => {
    expect(
      (await outsider.post('/api/comparisons').send({ name: 'x', runIds: [runA], dampingRatio: 0.05 }))
        .status,
    ).toBe(404)
    const res = await admin.post('/api/comparisons').send({ name: 'x', runIds: [runA], dampingRatio: 0.05 })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/engineer/)
  })
})

describe('POST /api/comparisons/preview', () => {
  it('draws a comparison without saving it', async () => {
    const before = (await engineer.get('/api/comparisons')).body.items.length
    const res = await admin.post('/api/comparisons/preview').send({
      runIds: [runA, runB],
      dampingRatio: 0.05,
      target,
      scaling: { fromS: 0.5, toS: 2, rule: 'suite-90' },
    })
    expect(res.status).toBe(200)
    expect(res.body).not.toHaveProperty('comparison')
    expect(res.body.scaling.check.passed).toBe(true)
    expect(res.body.curves[0].scaleFactor).toBeCloseTo(3.6, 12)
    expect((await engineer.get('/api/comparisons')).body.items.length).toBe(before)
  })

  it('answers 400 for bad input and 404 for another firm’s runs', async () => {
    expect(
      (await engineer.post('/api/comparisons/preview').send({ runIds: [], dampingRatio: 0.05 })).status,
    ).toBe(400)
    expect(
      (await outsider.post('/api/comparisons/preview').send({ runIds: [runA], dampingRatio: 0.05 })).status,
    ).toBe(404)
  })
})

describe('GET /api/comparisons', () => {
  it('lists the firm’s comparisons with their review state', async () => {
    const res = await admin.get('/api/comparisons')
    expect(res.status).toBe(200)
    expect(res.body.items.length).toBeGreaterThanOrEqual(4)
    for (const item of res.body.items) expect(item.reviewState).toBe('draft')
  })

  it('shows another firm nothing, and answers 404 for one of its comparisons', async () => {
    const list = await engineer.get('/api/comparisons')
    const id = list.body.items[0].id
    expect((await outsider.get('/api/comparisons')).body.items).toEqual([])
    expect((await outsider.get(`/api/comparisons/${id}`)).status).toBe(404)
  })
})

describe('PATCH /api/comparisons/:id', () => {
  let id: string
  beforeAll(async () => {
    const res = await engineer
      .post('/api/comparisons')
      .send({ name: 'To edit', runIds: [runA, runB], dampingRatio: 0.05 })
    id = res.body.comparison.id
  })

  it('changes the name, target and scaling and answers the new view', async () => {
    const res = await engineer
      .patch(`/api/comparisons/${id}`)
      .send({ name: 'Edited', target, scaling: { fromS: 0.5, toS: 2, rule: 'suite-90' } })
    expect(res.status).toBe(200)
    expect(res.body.comparison.name).toBe('Edited')
    expect(res.body.comparison.updatedAt).toEqual(expect.any(Number))
    expect(res.body.scaling.check.passed).toBe(true)
    const removed = await engineer.patch(`/api/comparisons/${id}`).send({ scaling: null, target: null })
    expect(removed.body.target).toBeNull()
    expect(removed.body.scaling).toBeNull()
    const audit = ctx.db.select().from(auditLog).where(eq(auditLog.subjectId, id)).all()
    expect(audit.map((a) => a.action)).toEqual([
      'comparison.created',
      'comparison.updated',
      'comparison.updated',
    ])
  })

  it('refuses an empty change and another firm', async () => {
    expect((await engineer.patch(`/api/comparisons/${id}`).send({})).status).toBe(400)
    expect((await outsider.patch(`/api/comparisons/${id}`).send({ name: 'x' })).status).toBe(404)
  })

  it('is refused with 409 while under review and once checked (locked)', async () => {
    const submitted = await engineer.post('/api/reviews').send({ subjectType: 'comparison', subjectId: id })
    expect(submitted.status).toBe(201)
    const underReview = await engineer.patch(`/api/comparisons/${id}`).send({ name: 'During review' })
    expect(underReview.status).toBe(409)
    expect(underReview.body.error.code).toBe('under_review')
    expect(
      (await checker.post(`/api/reviews/${submitted.body.id}/decision`).send({ decision: 'checked' })).status,
    ).toBe(200)
    const locked = await engineer.patch(`/api/comparisons/${id}`).send({ name: 'After check' })
    expect(locked.status).toBe(409)
    expect(locked.body.error.code).toBe('locked')
    const list = await engineer.get('/api/comparisons')
    expect(list.body.items.find((c: { id: string }) => c.id === id).reviewState).toBe('checked')
    expect(ctx.db.select().from(reviews).where(eq(reviews.subjectId, id)).get()?.state).toBe('checked')
  })

  it('makes a new revision of a checked comparison', async () => {
    const res = await engineer
      .post('/api/comparisons')
      .send({ name: 'Edited, revision 2', runIds: [runA, runB], dampingRatio: 0.05, revisionOf: id })
    expect(res.status).toBe(201)
    expect(res.body.comparison).toMatchObject({ revision: 2, revisionOf: id, reviewState: 'draft' })
  })
})
