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

describe('PATCH /api/projects/:id', () => {
  async function newProject(name: string): Promise<string> {
    const agent = await ctx.signIn('engineer@ordinate.test')
    const res = await agent.post('/api/projects').send({ name })
    expect(res.status).toBe(201)
    return res.body.id
  }

  it('renames a project and writes the audit log', async () => {
    const id = await newProject('Ferry terminal')
    const agent = await ctx.signIn('checker@ordinate.test')
    const res = await agent.patch(`/api/projects/${id}`).send({ name: 'Ferry terminal, stage 2' })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ id, name: 'Ferry terminal, stage 2', archived: false })
    const audit = ctx.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.action, 'project.updated'), eq(auditLog.subjectId, id)))
      .all()
    expect(audit.map((a) => a.detail)).toEqual([{ from: 'Ferry terminal', to: 'Ferry terminal, stage 2' }])
  })

  it('archives and unarchives a project; archived projects list after active ones', async () => {
    const id = await newProject('Boathouse')
    const agent = await ctx.signIn('engineer@ordinate.test')
    const archived = await agent.patch(`/api/projects/${id}`).send({ archived: true })
    expect(archived.status).toBe(200)
    expect(archived.body.archived).toBe(true)
    const list = (await agent.get('/api/projects')).body.items as { id: string; archived: boolean }[]
    expect(list.at(-1)).toMatchObject({ id, archived: true })
    expect(list.findIndex((p) => p.archived)).toBe(list.length - list.filter((p) => p.archived).length)
    const back = await agent.patch(`/api/projects/${id}`).send({ archived: false })
    expect(back.body.archived).toBe(false)
  })

  it('refuses to archive the default project with 409, and changes nothing', async () => {
    const agent = await ctx.signIn('engineer@ordinate.test')
    const res = await agent
      .patch(`/api/projects/${ctx.seed.projectIds[0]}`)
      .send({ archived: true, name: 'Renamed' })
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('default_project')
    const list = (await agent.get('/api/projects')).body.items
    expect(list[0]).toMatchObject({ name: 'Tidewater Library Annex', isDefault: true, archived: false })
  })

  it('answers 404 for another firm’s project and 400 for an empty change', async () => {
    const outsider = await ctx.signIn('outsider@ordinate.test')
    expect(
      (await outsider.patch(`/api/projects/${ctx.seed.projectIds[0]}`).send({ name: 'Taken' })).status,
    ).toBe(404)
    expect((await outsider.patch(`/api/projects/${ctx.seed.projectIds[1]}`).send({})).status).toBe(400)
  })

  it('refuses an admin who is not also an engineer or checker', async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    expect(
      (await admin.patch(`/api/projects/${ctx.seed.projectIds[0]}`).send({ name: 'Admin' })).status,
    ).toBe(403)
  })
})

describe('the projectId filter', () => {
  it('narrows records, runs and comparisons to one project', async () => {
    const agent = await ctx.signIn('engineer@ordinate.test')
    const other = await agent.post('/api/projects').send({ name: 'Empty project' })
    for (const list of ['records', 'runs', 'comparisons']) {
      const res = await agent.get(`/api/${list}?projectId=${other.body.id}`)
      expect(res.status, list).toBe(200)
      expect(res.body.items, list).toEqual([])
    }
    const upload = await agent
      .post('/api/records')
      .field('units', 'g')
      .field('dtS', '0.01')
      .field('projectId', other.body.id)
      .attach('file', Buffer.from('# synthetic\n' + '0\n0.01\n-0.01\n'.repeat(8)), 'p.txt')
    expect(upload.status).toBe(201)
    const inProject = await agent.get(`/api/records?projectId=${other.body.id}`)
    expect(inProject.body.items.map((r: { id: string }) => r.id)).toEqual([upload.body.id])
    const inDefault = await agent.get(`/api/records?projectId=${ctx.seed.projectIds[0]}`)
    expect(inDefault.body.items.map((r: { id: string }) => r.id)).not.toContain(upload.body.id)
  })
})
