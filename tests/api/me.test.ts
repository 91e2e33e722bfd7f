import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { auditLog } from '../../server/db/schema.js'
import { engineerUpload, insertRecord, startRunQueue } from '../support/runFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
beforeAll(async () => {
  ctx = await createTestContext()
})
afterAll(() => ctx.close())

describe('GET /api/me', () => {
  it('answers the member, firm, roles and units (SI until changed)', async () => {
    const agent = await ctx.signIn('checker@ordinate.test')
    const res = await agent.get('/api/me')
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({
      user: { email: 'checker@ordinate.test', name: 'Tomas Verhoek' },
      firm: { name: 'Halvorsen Kade Structural' },
      roles: ['checker'],
      units: 'si',
    })
  })

  it('answers 401 when signed out', async () => {
    expect((await ctx.anonymous().get('/api/me')).status).toBe(401)
  })
})

describe('PATCH /api/me', () => {
  it('sets the member’s units, keeps them across sign-ins, and writes the audit log once', async () => {
    const agent = await ctx.signIn('engineer@ordinate.test')
    const res = await agent.patch('/api/me').send({ units: 'us' })
    expect(res.status).toBe(200)
    expect(res.body.units).toBe('us')
    expect((await agent.patch('/api/me').send({ units: 'us' })).status).toBe(200)
    const again = await ctx.signIn('engineer@ordinate.test')
    expect((await again.get('/api/me')).body.units).toBe('us')
    const audit = ctx.db
      .select()
      .from(auditLog)
      .where(
        and(
          eq(auditLog.action, 'member.units_changed'),
          eq(auditLog.userId, ctx.seed.userIds['engineer@ordinate.test']!),
        ),
      )
      .all()
    expect(audit).toHaveLength(1)
    expect(audit[0]!.detail).toEqual({ from: 'si', to: 'us' })
  })

  it('leaves other members on their own units', async () => {
    const checker = await ctx.signIn('checker@ordinate.test')
    expect((await checker.get('/api/me')).body.units).toBe('si')
  })

  describe('with units that are not si or us', () => {
    it('responds 400 naming the field', async () => {
      const agent = await ctx.signIn('engineer@ordinate.test')
      const res = await agent.patch('/api/me').send({ units: 'imperial' })
      expect(res.status).toBe(400)
      expect(res.body.error.message).toBe('units: units must be si or us.')
    })
  })

  describe('with an unknown field', () => {
    it('responds 400', async () => {
      const agent = await ctx.signIn('engineer@ordinate.test')
      expect((await agent.patch('/api/me').send({ units: 'si', roles: ['admin'] })).status).toBe(400)
    })
  })
})

describe('files in the member’s units', () => {
  let runId: string

  beforeAll(async () => {
    const queue = startRunQueue(ctx, { workerCount: 1, runTimeLimitS: 60, idleMs: 1000 })
    const record = insertRecord(ctx.db, engineerUpload(ctx.seed))
    const agent = await ctx.signIn('engineer@ordinate.test')
    const res = await agent.post('/api/runs').send({ recordId: record.id, periodsS: [0.1, 0.5, 1, 2] })
    expect(res.status).toBe(202)
    runId = res.body.id
    await vi.waitFor(
      async () => {
        const run = await agent.get(`/api/runs/${runId}`)
        if (run.body.status !== 'succeeded') throw new Error(run.body.status)
      },
      { timeout: 30_000, interval: 50 },
    )
    await queue.stop(0)
  })

  /** The CSV's `#` lines and its table as numbers by column name. */
  function readCsv(text: string) {
    const lines = text.trim().split('\r\n')
    const comments = lines.filter((l) => l.startsWith('#'))
    const [header, ...rows] = lines.filter((l) => !l.startsWith('#'))
    const names = header!.split(',')
    const column = (name: string) => rows.map((r) => Number(r.split(',')[names.indexOf(name)]))
    return { comments, names, column }
  }

  it('writes CSV in US customary units for a member who chose them, and says so', async () => {
    // The engineer chose US customary units in the tests above.
    const agent = await ctx.signIn('engineer@ordinate.test')
    const us = readCsv((await agent.get(`/api/runs/${runId}/spectrum.csv`)).text)
    const si = readCsv((await agent.get(`/api/runs/${runId}/spectrum.csv?units=si`)).text)
    expect(us.names.slice(1)).toEqual([
      'sd_in_zeta0.05',
      'sv_in_per_s_zeta0.05',
      'sa_g_zeta0.05',
      'psv_in_per_s_zeta0.05',
      'psa_g_zeta0.05',
    ])
    expect(si.names).toContain('sd_m_zeta0.05')
    expect(us.comments.join('\n')).toMatch(
      /Units: US customary: SD in in, SV and PSV in in\/s, SA and PSA in g/,
    )
    expect(si.comments.join('\n')).toMatch(/Units: SI/)
    // 1 in = 0.0254 m exactly (international yard and pound agreement, 1959); g = 9.80665 m/s².
    const sdM = si.column('sd_m_zeta0.05')
    us.column('sd_in_zeta0.05').forEach((sdIn, i) => expect(sdIn).toBeCloseTo(sdM[i]! / 0.0254, 12))
    const psvM = si.column('psv_m_per_s_zeta0.05')
    us.column('psv_in_per_s_zeta0.05').forEach((v, i) => expect(v).toBeCloseTo(psvM[i]! / 0.0254, 12))
    const saM = si.column('sa_m_per_s2_zeta0.05')
    us.column('sa_g_zeta0.05').forEach((v, i) => expect(v).toBeCloseTo(saM[i]! / 9.80665, 12))
    expect(us.column('psa_g_zeta0.05')).toEqual(si.column('psa_g_zeta0.05'))
  })

  it('keeps SI for a member on SI unless the request asks for US units', async () => {
    const checker = await ctx.signIn('checker@ordinate.test')
    expect(readCsv((await checker.get(`/api/runs/${runId}/export.csv`)).text).names).toContain(
      'sd_m_zeta0.05',
    )
    const asked = readCsv((await checker.get(`/api/runs/${runId}/export.csv?units=us`)).text)
    expect(asked.names).toContain('sd_in_zeta0.05')
    expect((await checker.get(`/api/runs/${runId}/spectrum.csv?units=metric`)).status).toBe(400)
  })

  it('states the units on the sheet and gives PGV and PGD in in/s and in for US customary', async () => {
    const agent = await ctx.signIn('engineer@ordinate.test')
    const us = (await agent.get(`/api/runs/${runId}/sheet`)).body
    const field = (sheet: { method: { label: string; value: string }[] }, label: string) =>
      sheet.method.find((f) => f.label === label)?.value
    expect(field(us, 'Units')).toMatch(/^Units: US customary/)
    const recordFields = us.records[0].fields as { label: string; value: string }[]
    expect(recordFields.find((f) => f.label === 'PGV')?.value).toMatch(/ in\/s$/)
    expect(recordFields.find((f) => f.label === 'PGD')?.value).toMatch(/ in$/)
    const si = (await agent.get(`/api/runs/${runId}/sheet?units=si`)).body
    expect(field(si, 'Units')).toMatch(/^Units: SI/)
    expect(
      (si.records[0].fields as { label: string; value: string }[]).find((f) => f.label === 'PGV')?.value,
    ).toMatch(/ m\/s$/)
  })
})
