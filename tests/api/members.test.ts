import { eq } from 'drizzle-orm'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import request from 'supertest'
import { memberships } from '../../server/db/schema.js'
import { memberListSchema } from '../../shared/schemas/members.js'
import { auditRows } from '../support/mailbox.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
beforeEach(async () => {
  ctx = await createTestContext()
})
afterEach(() => ctx.close())

function membershipIdOf(email: string): string {
  const userId = ctx.seed.userIds[email]!
  return ctx.db.select().from(memberships).where(eq(memberships.userId, userId)).get()!.id
}

/** Gives the Brightwater member the admin role too, so firm isolation can be tested between two admins. */
function makeOutsiderAdmin() {
  ctx.db
    .update(memberships)
    .set({ roles: ['engineer', 'admin'] })
    .where(eq(memberships.userId, ctx.seed.userIds['outsider@ordinate.test']!))
    .run()
}

describe('GET /api/firm/members', () => {
  it("lists the admin's own firm only, in the documented shape", async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    const res = await admin.get('/api/firm/members')
    expect(res.status).toBe(200)
    const { items } = memberListSchema.parse(res.body)
    expect(items.map((m) => m.email).sort()).toEqual([
      'admin@ordinate.test',
      'checker@ordinate.test',
      'engineer@ordinate.test',
    ])
    expect(items.find((m) => m.email === 'checker@ordinate.test')?.roles).toEqual(['checker'])
    expect(JSON.stringify(res.body)).not.toMatch(/passwordHash|password_hash/)
  })

  it('refuses members without the admin role with 403 naming the role', async () => {
    const engineer = await ctx.signIn('engineer@ordinate.test')
    const res = await engineer.get('/api/firm/members')
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/admin role/)
  })

  it('answers 401 when signed out', async () => {
    expect((await request(ctx.app).get('/api/firm/members')).status).toBe(401)
  })
})

describe('PATCH /api/firm/members/:id', () => {
  it('replaces the roles, answers them in canonical order and records the change', async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    const id = membershipIdOf('engineer@ordinate.test')
    const res = await admin.patch(`/api/firm/members/${id}`).send({ roles: ['checker', 'engineer'] })
    expect(res.status).toBe(200)
    expect(res.body.roles).toEqual(['engineer', 'checker'])
    const engineer = await ctx.signIn('engineer@ordinate.test')
    expect((await engineer.get('/api/me')).body.roles).toEqual(['engineer', 'checker'])
    const [audit] = auditRows(ctx.db, 'member.roles_changed', id)
    expect(audit?.detail).toMatchObject({ from: ['engineer'], to: ['engineer', 'checker'] })
    expect(audit?.userId).toBe(ctx.seed.userIds['admin@ordinate.test'])
  })

  describe('with bad input', () => {
    it.each([
      ['no roles', { roles: [] }, /^roles: Choose at least one role/],
      ['an unknown role', { roles: ['boss'] }, /^roles\.0:/],
      ['a repeated role', { roles: ['checker', 'checker'] }, /^roles: Each role may appear once/],
      ['an unknown field', { roles: ['checker'], email: 'x@y.z' }, /email/],
      ['no body', undefined, /expected object/],
    ])('responds 400 for %s', async (_what, body, message) => {
      const admin = await ctx.signIn('admin@ordinate.test')
      const res = await admin
        .patch(`/api/firm/members/${membershipIdOf('engineer@ordinate.test')}`)
        .send(body)
      expect(res.status).toBe(400)
      expect(res.body.error.code).toBe('invalid_input')
      expect(res.body.error.message).toMatch(message)
    })

    it('responds 400 for an id that is not an id', async () => {
      const admin = await ctx.signIn('admin@ordinate.test')
      const res = await admin.patch('/api/firm/members/not-an-id').send({ roles: ['checker'] })
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(/^id:/)
    })
  })

  it("answers 404 for another firm's member, and changes nothing", async () => {
    makeOutsiderAdmin()
    const outsider = await ctx.signIn('outsider@ordinate.test')
    const id = membershipIdOf('engineer@ordinate.test')
    const res = await outsider.patch(`/api/firm/members/${id}`).send({ roles: ['admin'] })
    expect(res.status).toBe(404)
    expect(ctx.db.select().from(memberships).where(eq(memberships.id, id)).get()?.roles).toEqual(['engineer'])
  })

  it('answers 404 for an id that belongs to nobody', async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    const res = await admin
      .patch('/api/firm/members/00000000-0000-4000-8000-000000000000')
      .send({ roles: ['checker'] })
    expect(res.status).toBe(404)
  })

  it('refuses non-admins with 403 naming the admin role', async () => {
    const checker = await ctx.signIn('checker@ordinate.test')
    const res = await checker
      .patch(`/api/firm/members/${membershipIdOf('checker@ordinate.test')}`)
      .send({ roles: ['admin'] })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/admin role/)
  })

  describe('for the firm’s only admin', () => {
    it('refuses to drop their own admin role with 409', async () => {
      const admin = await ctx.signIn('admin@ordinate.test')
      const id = membershipIdOf('admin@ordinate.test')
      const res = await admin.patch(`/api/firm/members/${id}`).send({ roles: ['engineer'] })
      expect(res.status).toBe(409)
      expect(res.body.error.code).toBe('last_admin')
      expect(res.body.error.message).toMatch(/only admin/)
      expect((await admin.get('/api/me')).body.roles).toEqual(['admin'])
    })

    it('allows it once another member is an admin too', async () => {
      const admin = await ctx.signIn('admin@ordinate.test')
      await admin
        .patch(`/api/firm/members/${membershipIdOf('checker@ordinate.test')}`)
        .send({ roles: ['checker', 'admin'] })
        .expect(200)
      const res = await admin
        .patch(`/api/firm/members/${membershipIdOf('admin@ordinate.test')}`)
        .send({ roles: ['engineer'] })
      expect(res.status).toBe(200)
      expect((await admin.get('/api/firm/members')).status).toBe(403)
    })

    it('may add roles while keeping admin', async () => {
      const admin = await ctx.signIn('admin@ordinate.test')
      const res = await admin
        .patch(`/api/firm/members/${membershipIdOf('admin@ordinate.test')}`)
        .send({ roles: ['admin', 'engineer'] })
      expect(res.status).toBe(200)
      expect(res.body.roles).toEqual(['engineer', 'admin'])
    })
  })
})

describe('DELETE /api/firm/members/:id', () => {
  it('removes the member, ends their sessions and records it', async () => {
    const checker = await ctx.signIn('checker@ordinate.test')
    const admin = await ctx.signIn('admin@ordinate.test')
    const id = membershipIdOf('checker@ordinate.test')
    expect((await admin.delete(`/api/firm/members/${id}`)).status).toBe(204)
    expect((await checker.get('/api/me')).status).toBe(401)
    const signIn = await ctx
      .anonymous()
      .post('/api/auth/sign-in')
      .send({ email: 'checker@ordinate.test', password: 'ordinate-demo' })
    expect(signIn.status).toBe(401)
    const { items } = memberListSchema.parse((await admin.get('/api/firm/members')).body)
    expect(items.map((m) => m.email)).not.toContain('checker@ordinate.test')
    expect(auditRows(ctx.db, 'member.removed', id)).toHaveLength(1)
  })

  it("answers 404 for another firm's member and leaves them in place", async () => {
    makeOutsiderAdmin()
    const outsider = await ctx.signIn('outsider@ordinate.test')
    const id = membershipIdOf('engineer@ordinate.test')
    expect((await outsider.delete(`/api/firm/members/${id}`)).status).toBe(404)
    expect(ctx.db.select().from(memberships).where(eq(memberships.id, id)).get()).toBeDefined()
  })

  it('refuses the last admin removing themself with 409', async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    const res = await admin.delete(`/api/firm/members/${membershipIdOf('admin@ordinate.test')}`)
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('last_admin')
    expect((await admin.get('/api/me')).status).toBe(200)
  })

  it('lets an admin leave when another admin remains', async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    await admin
      .patch(`/api/firm/members/${membershipIdOf('engineer@ordinate.test')}`)
      .send({ roles: ['engineer', 'admin'] })
      .expect(200)
    expect((await admin.delete(`/api/firm/members/${membershipIdOf('admin@ordinate.test')}`)).status).toBe(
      204,
    )
    expect((await admin.get('/api/me')).status).toBe(401)
  })

  it('refuses non-admins with 403 naming the admin role', async () => {
    const engineer = await ctx.signIn('engineer@ordinate.test')
    const res = await engineer.delete(`/api/firm/members/${membershipIdOf('checker@ordinate.test')}`)
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/admin role/)
  })

  it('answers 400 for an id that is not an id', async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    expect((await admin.delete('/api/firm/members/42')).status).toBe(400)
  })
})
