import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { insertSucceededRun } from '../support/comparisonFixtures.js'
import { insertRecord } from '../support/runFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let engineer: request.Agent
let outsider: request.Agent
let owner: { firmId: string; projectId: string; userId: string }

beforeAll(async () => {
  ctx = await createTestContext()
  owner = {
    firmId: ctx.seed.firmIds[0] as string,
    projectId: ctx.seed.projectIds[0] as string,
    userId: ctx.seed.userIds['engineer@ordinate.test'] as string,
  }
  engineer = await ctx.signIn('engineer@ordinate.test')
  outsider = await ctx.signIn('outsider@ordinate.test')
})
afterAll(() => ctx?.close())

async function freshPair(): Promise<string> {
  const uploader = { firmId: owner.firmId, projectId: owner.projectId, uploadedBy: owner.userId }
  const a = insertRecord(ctx.db, uploader, { name: 'Synthetic H1', points: 300 })
  const b = insertRecord(ctx.db, uploader, { name: 'Synthetic H2', points: 300 })
  const res = await engineer.post('/api/record-pairs').send({ recordIds: [a.id, b.id] })
  expect(res.status).toBe(201)
  return res.body.id as string
}

describe('DELETE /api/record-pairs/:id', () => {
  it('removes a pair no run uses and keeps its records', async () => {
    const id = await freshPair()
    const before = (await engineer.get('/api/records')).body.items.length
    const res = await engineer.delete(`/api/record-pairs/${id}`)
    expect(res.status).toBe(204)
    const pairs = (await engineer.get('/api/record-pairs')).body.items as Array<{ id: string }>
    expect(pairs.map((p) => p.id)).not.toContain(id)
    expect((await engineer.get('/api/records')).body.items.length).toBe(before)
  })

  describe('with a run of the pair', () => {
    it('responds 409 pair_in_use and keeps the pair', async () => {
      insertSucceededRun(ctx.db, owner, {
        name: 'Synthetic used pair',
        periodsS: [0.1, 1],
        curves: [{ dampingRatio: 0.05, psaG: [0.5, 0.2], combination: 'rotd50' }],
        pair: true,
      })
      const used = (
        (await engineer.get('/api/record-pairs')).body.items as Array<{ id: string; name: string }>
      ).find((p) => p.name === 'Synthetic used pair')
      expect(used).toBeDefined()
      const res = await engineer.delete(`/api/record-pairs/${used?.id}`)
      expect(res.status).toBe(409)
      expect(res.body.error.code).toBe('pair_in_use')
      expect(res.body.error.message).toMatch(/a run/)
      const pairs = (await engineer.get('/api/record-pairs')).body.items as Array<{ id: string }>
      expect(pairs.map((p) => p.id)).toContain(used?.id)
    })
  })

  it("answers 404 for another firm's pair", async () => {
    const id = await freshPair()
    const res = await outsider.delete(`/api/record-pairs/${id}`)
    expect(res.status).toBe(404)
  })
})
