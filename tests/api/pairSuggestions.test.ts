import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type request from 'supertest'
import { suggestPairs } from '../../shared/pairSuggestions.js'
import { engineerUpload, insertRecord } from '../support/runFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let engineer: request.Agent

beforeAll(async () => {
  ctx = await createTestContext()
  const owner = engineerUpload(ctx.seed)
  for (const [name, options] of [
    ['Wharf H1', {}],
    ['Wharf H2', {}],
    ['Silo_000', { dtS: 0.005, points: 800 }],
    ['Silo_090', { dtS: 0.005, points: 800 }],
    ['Gantry N', { dtS: 0.01 }],
    ['Gantry E', { dtS: 0.005 }],
    ['Crane X', { points: 900 }],
    ['Crane Y', { points: 901 }],
  ] as const) {
    insertRecord(ctx.db, owner, { name, ...options })
  }
  engineer = await ctx.signIn('engineer@ordinate.test')
})
afterAll(() => ctx.close())

describe('pair suggestions against POST /api/record-pairs', () => {
  it('are all accepted by the server, and every near miss is refused by it', async () => {
    const records = (await engineer.get('/api/records')).body.items
    const { suggestions, nearMisses } = suggestPairs(records)
    expect(suggestions.map((s) => s.name).sort()).toEqual(['Silo_000/090', 'Wharf H1/H2'])
    for (const s of suggestions) {
      const res = await engineer.post('/api/record-pairs').send({ recordIds: s.recordIds, name: s.name })
      expect(res.status, JSON.stringify(res.body)).toBe(201)
    }
    expect(nearMisses.map((n) => n.names.join(' + ')).sort()).toEqual([
      'Crane X + Crane Y',
      'Gantry N + Gantry E',
    ])
    for (const n of nearMisses) {
      const res = await engineer.post('/api/record-pairs').send({ recordIds: n.recordIds })
      expect(res.status).toBe(400)
      expect(n.reasons).toContain(res.body.error.message)
    }
    const pairs = (await engineer.get('/api/record-pairs')).body.items
    expect(suggestPairs(records, pairs).suggestions).toEqual([])
  })
})
