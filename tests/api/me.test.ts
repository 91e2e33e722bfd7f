import { and, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { auditLog } from '../../server/db/schema.js'
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
