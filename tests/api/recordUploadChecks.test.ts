import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { postRecord } from '../support/recordUploads.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
beforeAll(async () => {
  ctx = await createTestContext()
})
afterAll(() => ctx.close())

/** A synthetic motion, one value per line, peaking near `amplitude`. */
const column = (amplitude: number) =>
  '# synthetic test motion\n' +
  Array.from({ length: 200 }, (_, i) => (amplitude * Math.sin(i / 4)).toFixed(5)).join('\n')

describe('POST /api/records checks on units and time step', () => {
  it('reads a decimal comma in the Δt field ("0,005") as 0.005 s', async () => {
    const agent = await ctx.signIn('engineer@ordinate.test')
    const res = await postRecord(agent, column(0.2), 'comma.txt', { units: 'g', dtS: '0,005' })
    expect(res.status).toBe(201)
    expect(res.body.dtS).toBe(0.005)
  })

  it('refuses an unreadable Δt on the field instead of emptying it', async () => {
    const agent = await ctx.signIn('engineer@ordinate.test')
    const res = await postRecord(agent, column(0.2), 'bad-dt.txt', { units: 'g', dtS: '0.005 s' })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/^dtS: Enter the time step in seconds/)
  })

  it('stores a record whose values look like m/s² given as g, with a warning naming the mistake', async () => {
    const agent = await ctx.signIn('engineer@ordinate.test')
    const res = await postRecord(agent, column(6), 'ms2-as-g.txt', { units: 'g', dtS: '0.01' })
    expect(res.status).toBe(201)
    expect(res.body.warnings).toEqual(
      expect.arrayContaining([expect.stringMatching(/^PGA is 6(\.\d+)? g .*look like m\/s², not g/)]),
    )
    const stored = await agent.get(`/api/records/${res.body.id}`)
    expect(stored.body.warnings).toEqual(res.body.warnings)
  })
})
