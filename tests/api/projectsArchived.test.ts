import { existsSync, readdirSync } from 'node:fs'
import path from 'node:path'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { insertSucceededRun } from '../support/comparisonFixtures.js'
import { snapshotDb } from '../support/dbSnapshot.js'
import { insertRecord } from '../support/runFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

// Work filed to an archived project is refused with 409 project_archived naming the project;
// reading it stays allowed, and a refusal writes nothing.

const PROJECT = 'Synthetic wharf study'
const CSV = `time,accel\n${Array.from({ length: 40 }, (_, i) => `${(i * 0.01).toFixed(2)},${(0.1 * Math.sin(i / 3)).toFixed(4)}`).join('\n')}\n`

let ctx: TestContext
let engineer: request.Agent
let projectId: string
let recordIds: string[]
let pairId: string
let runIds: string[]
let comparisonId: string

beforeAll(async () => {
  ctx = await createTestContext()
  engineer = await ctx.signIn('engineer@ordinate.test')
  const created = await engineer.post('/api/projects').send({ name: PROJECT })
  projectId = created.body.id
  const owner = {
    firmId: ctx.seed.firmIds[0]!,
    projectId,
    userId: ctx.seed.userIds['engineer@ordinate.test']!,
  }
  const uploader = { firmId: owner.firmId, projectId, uploadedBy: owner.userId }
  recordIds = [
    insertRecord(ctx.db, uploader, { name: 'Synthetic wharf H1', points: 400 }).id,
    insertRecord(ctx.db, uploader, { name: 'Synthetic wharf H2', points: 400 }).id,
  ]
  const pair = await engineer.post('/api/record-pairs').send({ recordIds: [recordIds[0], recordIds[1]] })
  expect(pair.status).toBe(201)
  pairId = pair.body.id
  const periodsS = [0.5, 1, 2]
  runIds = ['A', 'B'].map((k) =>
    insertSucceededRun(ctx.db, owner, {
      name: `Synthetic wharf motion ${k}`,
      periodsS,
      curves: [{ dampingRatio: 0.05, psaG: [1, 2, 1] }],
    }),
  )
  const comparison = await engineer
    .post('/api/comparisons')
    .send({ name: 'Wharf suite', runIds, dampingRatio: 0.05 })
  expect(comparison.status).toBe(201)
  comparisonId = comparison.body.comparison.id
  const archived = await engineer.patch(`/api/projects/${projectId}`).send({ archived: true })
  expect(archived.body.archived).toBe(true)
})
afterAll(() => ctx.close())

function upload(fields: Record<string, string>) {
  let req = engineer.post('/api/records')
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v)
  return req.attach('file', Buffer.from(CSV), {
    filename: 'wharf-h3.csv',
    contentType: 'application/octet-stream',
  })
}

const originals = () => {
  const dir = path.join(ctx.dataDir, 'originals')
  return existsSync(dir) ? readdirSync(dir) : []
}

describe('an archived project', () => {
  const refusals: [string, () => request.Test, string][] = [
    ['an upload', () => upload({ projectId, units: 'g' }), 'records'],
    [
      'a processed record',
      () =>
        engineer.post(`/api/records/${recordIds[0]}/processed`).send({
          baseline: { order: 1 },
          taperS: 0.5,
          highPass: { hz: 0.2, order: 4 },
          lowPass: { hz: 20, order: 4 },
        }),
      'records',
    ],
    [
      'a run of one of its records',
      () => engineer.post('/api/runs').send({ recordId: recordIds[0], dampingRatios: [0.05] }),
      'runs',
    ],
    [
      'a run of one of its pairs',
      () => engineer.post('/api/runs').send({ pairId, combinations: ['rotd50'], dampingRatios: [0.05] }),
      'runs',
    ],
    [
      'a batch of its records and pair',
      () =>
        engineer
          .post('/api/run-batches')
          .send({ recordIds, pairIds: [pairId], combinations: ['rotd50'], dampingRatios: [0.05] }),
      'runs',
    ],
    [
      'a pair of its records',
      () =>
        engineer
          .post('/api/record-pairs')
          .send({ recordIds: [recordIds[1], recordIds[0]], name: 'Wharf again' }),
      'record pairs',
    ],
    [
      'a comparison of its runs',
      () => engineer.post('/api/comparisons').send({ name: 'Wharf suite 2', runIds, dampingRatio: 0.05 }),
      'comparisons',
    ],
    [
      'a comparison filed to it by id',
      () =>
        engineer
          .post('/api/comparisons')
          .send({ name: 'Wharf suite 3', projectId, runIds: [runIds[0]], dampingRatio: 0.05 }),
      'comparisons',
    ],
  ]

  for (const [what, send, work] of refusals) {
    it(`refuses ${what} with 409 naming the project, writing nothing`, async () => {
      const before = snapshotDb(ctx.db)
      const files = originals()
      const res = await send()
      expect(res.status).toBe(409)
      expect(res.body.error.code).toBe('project_archived')
      expect(res.body.error.message).toContain(`The project “${PROJECT}” is archived`)
      expect(res.body.error.message).toContain(`no new ${work}`)
      expect(snapshotDb(ctx.db)).toEqual(before)
      expect(originals()).toEqual(files)
    })
  }

  it('still lets its work be read', async () => {
    const list = await engineer.get('/api/records').query({ projectId })
    expect(list.status).toBe(200)
    expect(list.body.items.map((r: { id: string }) => r.id)).toEqual(expect.arrayContaining(recordIds))
    expect((await engineer.get(`/api/records/${recordIds[0]}`)).status).toBe(200)
    expect((await engineer.get(`/api/runs/${runIds[0]}`)).status).toBe(200)
    expect((await engineer.get(`/api/comparisons/${comparisonId}`)).status).toBe(200)
    const pairs = await engineer.get('/api/record-pairs')
    expect(pairs.body.items.map((p: { id: string }) => p.id)).toContain(pairId)
    const preview = await engineer.post('/api/comparisons/preview').send({ runIds, dampingRatio: 0.05 })
    expect(preview.status).toBe(200)
  })

  it('takes work again once restored', async () => {
    const restored = await engineer.patch(`/api/projects/${projectId}`).send({ archived: false })
    expect(restored.body.archived).toBe(false)
    const res = await upload({ projectId, units: 'g' })
    expect(res.body.error?.message).toBeUndefined()
    expect(res.status).toBe(201)
    expect(res.body.projectId).toBe(projectId)
  })
})
