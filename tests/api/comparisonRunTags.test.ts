import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { sheetReference } from '../../shared/sheets/sheetReference.js'
import { insertSucceededRun } from '../support/comparisonFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

// Two runs of one record share a label; the comparison tells them apart by the reference their
// own sheets print (ORD-R-…), the same tag the run picker shows.

let ctx: TestContext
let engineer: request.Agent
let runIds: string[]

beforeAll(async () => {
  ctx = await createTestContext()
  engineer = await ctx.signIn('engineer@ordinate.test')
  const owner = {
    firmId: ctx.seed.firmIds[0]!,
    projectId: ctx.seed.projectIds[0]!,
    userId: ctx.seed.userIds['engineer@ordinate.test']!,
  }
  runIds = [1, 2, 3].map((k) =>
    insertSucceededRun(ctx.db, owner, {
      name: k < 3 ? 'Synthetic quay motion' : 'Synthetic yard motion',
      periodsS: [0.5, 1, 2],
      curves: [{ dampingRatio: 0.05, psaG: [1, k, 1] }],
    }),
  )
})
afterAll(() => ctx.close())

describe('sheetReference', () => {
  it('is ORD-R- and the first eight hex digits of the id, upper case', () => {
    expect(sheetReference('run', '3f2a9c1b-0000-4000-8000-000000000000')).toBe('ORD-R-3F2A9C1B')
    expect(sheetReference('comparison', '3f2a9c1b-0000-4000-8000-000000000000')).toBe('ORD-C-3F2A9C1B')
  })
})

describe('the labels of a comparison’s runs', () => {
  it('tag two runs of one name with their sheet references and leave a lone name as it is', async () => {
    const res = await engineer.post('/api/comparisons/preview').send({ runIds, dampingRatio: 0.05 })
    expect(res.status).toBe(200)
    expect(res.body.curves.map((c: { label: string }) => c.label)).toEqual([
      `Synthetic quay motion (${sheetReference('run', runIds[0]!)})`,
      `Synthetic quay motion (${sheetReference('run', runIds[1]!)})`,
      'Synthetic yard motion',
    ])
  })
})
