import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { and, eq } from 'drizzle-orm'
import { auditLog } from '../../server/db/schema.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
beforeAll(async () => {
  ctx = await createTestContext()
})
afterAll(() => ctx.close())

describe('GET /api/projects', () => {
  it('answers 401 when signed out', async () => {
    expect((await ctx.anonymous().get('/api/projects')).status).toBe(401)
  })

  it('lists the firm’s default project first', async () => {
    const agent = await ctx.signIn('checker@ordinate.test')
    const res = await agent.get('/api/projects')
    expect(res.status).toBe(200)
    expect(res.body.items[0]).toMatchObject({ name: 'Tidewater Library Annex', isDefault: true })
  })

  it('never shows another firm’s projects', async () => {
    const agent = await ctx.signIn('outsider@ordinate.test')
    const res = await agent.get('/api/projects')
    expect(res.body.items.map((p: { name: string }) => p.name)).toEqual(['Quayside Car Park'])
  })
})

describe('POST /api/projects', () => {
  it('creates a project for an engineer, answers 201 and writes the audit log', async () => {
    const agent = await ctx.signIn('engineer@ordinate.test')
    const res = await agent
      .post('/api/projects')
      .send({ name: 'Harbour Pumping Station', description: 'Retrofit' })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({
      name: 'Harbour Pumping Station',
      description: 'Retrofit',
      isDefault: false,
    })
    const list = await agent.get('/api/projects')
    expect(list.body.items.map((p: { id: string }) => p.id)).toContain(res.body.id)
    const audit = ctx.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'project.created'), eq(auditLog.subjectId, res.body.id)))
      .all()
    expect(audit).toHaveLength(1)
  })

  it('lets a checker create a project', async () => {
    const agent = await ctx.signIn('checker@ordinate.test')
    expect((await agent.post('/api/projects').send({ name: 'Checker’s re-analysis' })).status).toBe(201)
  })

  it('refuses an admin who is not also an engineer with 403 naming the role', async () => {
    const agent = await ctx.signIn('admin@ordinate.test')
    const res = await agent.post('/api/projects').send({ name: 'Admin project' })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/engineer/)
  })

  describe('with an empty name', () => {
    it('responds 400 naming the field', async () => {
      const agent = await ctx.signIn('engineer@ordinate.test')
      const res = await agent.post('/api/projects').send({ name: '  ' })
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(/^name:/)
    })
  })

  describe('with an unknown field', () => {
    it('responds 400', async () => {
      const agent = await ctx.signIn('engineer@ordinate.test')
      const res = await agent.post('/api/projects').send({ name: 'X', firmId: 'other' })
      expect(res.status).toBe(400)
    })
  })
})
