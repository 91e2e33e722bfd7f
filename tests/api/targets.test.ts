import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type request from 'supertest'
import { createTestContext, signInDemoMembers, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let engineer: request.Agent
let checker: request.Agent
let admin: request.Agent
let outsider: request.Agent

beforeAll(async () => {
  ctx = await createTestContext()
  ;({ engineer, checker, admin, outsider } = await signInDemoMembers(ctx))
})
afterAll(() => ctx.close())

describe('POST /api/targets/preview', () => {
  describe('with an ASCE 7-16 two-period target', () => {
    it('answers Sa at the given periods (hand-computed, ASCE 7-16 §11.4.6)', async () => {
      // SDS = 1.0, SD1 = 0.6, TL = 8: T0 = 0.12 s, TS = 0.6 s.
      // T = 0: 0.4·SDS = 0.4; T = 0.06: 0.4 + 0.6·0.5 = 0.7; T = 1: SD1/T = 0.6; T = 10: SD1·TL/T² = 0.048.
      const res = await engineer
        .post('/api/targets/preview')
        .send({ kind: 'asce7-two-period', sdsG: 1.0, sd1G: 0.6, tlS: 8, periodsS: [0, 0.06, 1, 10] })
      expect(res.status).toBe(200)
      expect(res.body.periodsS).toEqual([0, 0.06, 1, 10])
      const expected = [0.4, 0.7, 0.6, 0.048]
      expected.forEach((v, i) => expect(res.body.saG[i]).toBeCloseTo(v, 12))
      expect(res.body.label).toMatch(/ASCE 7-16/)
      expect(res.body.beyondDefinedRange).toBe(false)
    })

    it('gives MCE_R as 1.5 × design', async () => {
      const res = await engineer
        .post('/api/targets/preview')
        .send({ kind: 'asce7-two-period', sdsG: 1.0, sd1G: 0.6, tlS: 8, level: 'mceR', periodsS: [1] })
      expect(res.body.saG[0]).toBeCloseTo(0.9, 12)
    })

    it('uses the default grid (100 per decade, 0.01–10 s) without periodsS', async () => {
      const res = await checker
        .post('/api/targets/preview')
        .send({ kind: 'asce7-two-period', sdsG: 1, sd1G: 0.4, tlS: 6 })
      expect(res.status).toBe(200)
      expect(res.body.periodsS).toHaveLength(301)
      expect(res.body.periodsS[0]).toBeCloseTo(0.01, 12)
      expect(res.body.periodsS[300]).toBeCloseTo(10, 12)
    })
  })

  describe('with an EN 1998-1 target', () => {
    it('answers Se with η from the damping ratio and null beyond 4 s', async () => {
      // Type 1, ground C: S = 1.15, TC = 0.6. ag = 0.3 g, ξ = 10% → η = √(10/15) = 0.816497.
      // T = 0.4 (plateau): 2.5·0.3·1.15·0.816497 = 0.704229 g; T = 5 s: undefined.
      const res = await engineer.post('/api/targets/preview').send({
        kind: 'en1998-1',
        spectrumType: 1,
        groundType: 'C',
        agG: 0.3,
        dampingRatio: 0.1,
        periodsS: [0.4, 5],
      })
      expect(res.status).toBe(200)
      expect(res.body.saG[0]).toBeCloseTo(0.704229, 5)
      expect(res.body.saG[1]).toBeNull()
      expect(res.body.beyondDefinedRange).toBe(true)
      expect(res.body.notes.join(' ')).toMatch(/up to 4 s/)
    })
  })

  describe('with a user target as CSV', () => {
    it('parses the points and interpolates log-log', async () => {
      // (0.1 s, 0.5 g) and (1 s, 0.05 g): Sa = 0.05/T, so 0.1 g at 0.5 s.
      const res = await engineer
        .post('/api/targets/preview')
        .send({ kind: 'user-csv', csv: 'period_s,sa_g\n0.1,0.5\n1,0.05\n', periodsS: [0.5] })
      expect(res.status).toBe(200)
      expect(res.body.saG[0]).toBeCloseTo(0.1, 12)
      expect(res.body.definition).toEqual({ kind: 'user', periodsS: [0.1, 1], saG: [0.5, 0.05] })
    })

    it('responds 400 naming the line of a bad row', async () => {
      const res = await engineer
        .post('/api/targets/preview')
        .send({ kind: 'user-csv', csv: 'T,Sa\n0.1,0.5\n0.2,high\n' })
      expect(res.status).toBe(400)
      expect(res.body.error.code).toBe('invalid_target_csv')
      expect(res.body.error.line).toBe(3)
    })
  })

  describe('with bad input', () => {
    it('responds 400 naming a missing field', async () => {
      const res = await engineer
        .post('/api/targets/preview')
        .send({ kind: 'asce7-two-period', sdsG: 1, tlS: 8 })
      expect(res.status).toBe(400)
      expect(res.body.error.code).toBe('invalid_input')
      expect(res.body.error.message).toMatch(/sd1G/)
    })

    it('responds 400 to an unknown kind, an unknown field and a ground type F', async () => {
      for (const body of [
        { kind: 'nz-1170', z: 0.4 },
        { kind: 'asce7-two-period', sdsG: 1, sd1G: 0.5, tlS: 8, r: 8 },
        { kind: 'en1998-1', spectrumType: 1, groundType: 'F', agG: 0.2 },
      ]) {
        const res = await engineer.post('/api/targets/preview').send(body)
        expect(res.status).toBe(400)
        expect(res.body.error.code).toBe('invalid_input')
      }
    })

    it('responds 400 when TL is below TS', async () => {
      const res = await engineer
        .post('/api/targets/preview')
        .send({ kind: 'asce7-two-period', sdsG: 0.5, sd1G: 1, tlS: 1 })
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(/tlS/)
    })

    it('responds 400 to a damping given in percent', async () => {
      const res = await engineer
        .post('/api/targets/preview')
        .send({ kind: 'en1998-1', spectrumType: 2, groundType: 'A', agG: 0.2, dampingRatio: 5 })
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(/ratio, not a percentage/)
    })
  })

  it('responds 401 when signed out', async () => {
    const res = await ctx
      .anonymous()
      .post('/api/targets/preview')
      .send({ kind: 'asce7-two-period', sdsG: 1, sd1G: 0.5, tlS: 8 })
    expect(res.status).toBe(401)
  })
})

describe('POST /api/targets and GET /api/targets', () => {
  it('saves a target in the default project for an engineer', async () => {
    const res = await engineer.post('/api/targets').send({
      name: 'Site design spectrum',
      definition: { kind: 'asce7-two-period', sdsG: 1.1, sd1G: 0.55, tlS: 8 },
    })
    expect(res.status).toBe(201)
    expect(res.body.projectId).toBe(ctx.seed.projectIds[0])
    expect(res.body.definition).toEqual({
      kind: 'asce7-two-period',
      sdsG: 1.1,
      sd1G: 0.55,
      tlS: 8,
      level: 'design',
    })
    expect(res.body.label).toMatch(/ASCE 7-16/)
    expect(res.body.createdBy.name).toBe('Ines Marlowe')
  })

  it('saves a CSV target as its points for a checker', async () => {
    const res = await checker.post('/api/targets').send({
      name: 'Uploaded multi-period',
      definition: { kind: 'user-csv', csv: '0.1,0.6\n1,0.3\n4,0.05\n', source: 'site.csv' },
    })
    expect(res.status).toBe(201)
    expect(res.body.definition).toEqual({
      kind: 'user',
      periodsS: [0.1, 1, 4],
      saG: [0.6, 0.3, 0.05],
      source: 'site.csv',
    })
  })

  it('lists the firm’s targets, filtered by project', async () => {
    const all = await engineer.get('/api/targets')
    expect(all.status).toBe(200)
    expect(all.body.items.map((t: { name: string }) => t.name).sort()).toEqual([
      'Site design spectrum',
      'Uploaded multi-period',
    ])
    const inProject = await engineer.get('/api/targets').query({ projectId: ctx.seed.projectIds[0] })
    expect(inProject.body.items).toHaveLength(2)
  })

  it('keeps firms apart: the outsider sees none, and another firm’s project answers 404', async () => {
    expect((await outsider.get('/api/targets')).body.items).toEqual([])
    const res = await outsider.post('/api/targets').send({
      name: 'x',
      projectId: ctx.seed.projectIds[0],
      definition: { kind: 'asce7-two-period', sdsG: 1, sd1G: 0.5, tlS: 8 },
    })
    expect(res.status).toBe(404)
  })

  it('refuses an admin who is not an engineer or checker, naming the roles', async () => {
    const res = await admin
      .post('/api/targets')
      .send({ name: 'x', definition: { kind: 'asce7-two-period', sdsG: 1, sd1G: 0.5, tlS: 8 } })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/engineer/)
  })

  it('refuses a bad CSV with its line and stores nothing', async () => {
    const res = await engineer
      .post('/api/targets')
      .send({ name: 'bad', definition: { kind: 'user-csv', csv: '0.2,0.5\n0.1,0.4\n' } })
    expect(res.status).toBe(400)
    expect(res.body.error.line).toBe(2)
    expect((await engineer.get('/api/targets')).body.items).toHaveLength(2)
  })
})
