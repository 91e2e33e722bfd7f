import { createHash } from 'node:crypto'
import { eq } from 'drizzle-orm'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { apiTokens, memberships } from '../../server/db/schema.js'
import { addMember } from '../support/demoWorld.js'
import { engineerUpload, insertRecord } from '../support/runFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let engineer: request.Agent
let admin: request.Agent
let outsider: request.Agent
let recordId: string

beforeAll(async () => {
  ctx = await createTestContext()
  engineer = await ctx.signIn('engineer@ordinate.test')
  admin = await ctx.signIn('admin@ordinate.test')
  outsider = await ctx.signIn('outsider@ordinate.test')
  recordId = insertRecord(ctx.db, engineerUpload(ctx.seed)).id
})
afterAll(() => ctx.close())

/** A plain client with no cookie and no CSRF header: what a script sends. */
const script = () => request(ctx.app)
const bearer = (token: string) => ({ authorization: `Bearer ${token}` })

async function newToken(agent: request.Agent, body: Record<string, unknown> = { name: 'suite scripts' }) {
  const res = await agent.post('/api/me/tokens').send(body)
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return res.body as { id: string; token: string; hint: string; roles: string[] }
}

describe('POST /api/me/tokens', () => {
  it('answers the secret once and stores only its SHA-256', async () => {
    const created = await newToken(engineer)
    expect(created.token).toMatch(/^ordt_[A-Za-z0-9_-]{43}$/)
    expect(created.token.startsWith(created.hint)).toBe(true)
    expect(created.roles).toEqual(['engineer'])
    const row = ctx.db.select().from(apiTokens).where(eq(apiTokens.id, created.id)).get()!
    expect(row.tokenHash).toBe(createHash('sha256').update(created.token).digest('hex'))
    expect(JSON.stringify(row)).not.toContain(created.token)
    const list = await engineer.get('/api/me/tokens')
    const listed = list.body.items.find((t: { id: string }) => t.id === created.id)
    expect(listed).toMatchObject({ name: 'suite scripts', lastUsedAt: null })
    expect(JSON.stringify(list.body)).not.toContain(created.token)
  })

  it('refuses roles the member does not hold, naming the field', async () => {
    const res = await engineer
      .post('/api/me/tokens')
      .send({ name: 'too strong', roles: ['engineer', 'admin'] })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/^roles: .*admin/)
  })

  it('refuses an expiry in the past', async () => {
    const res = await engineer.post('/api/me/tokens').send({ name: 'stale', expiresAt: Date.now() - 1000 })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/^expiresAt:/)
  })

  it('refuses a request made with a token: tokens cannot mint tokens', async () => {
    const { token } = await newToken(engineer)
    const res = await script().post('/api/me/tokens').set(bearer(token)).send({ name: 'offspring' })
    expect(res.status).toBe(403)
  })
})

describe('Authorization: Bearer', () => {
  it('acts as the member, needs no CSRF header, and records the last use', async () => {
    const { id, token } = await newToken(engineer)
    const me = await script().get('/api/me').set(bearer(token))
    expect(me.status).toBe(200)
    expect(me.body.user.email).toBe('engineer@ordinate.test')
    const project = await script().post('/api/projects').set(bearer(token)).send({ name: 'Scripted project' })
    expect(project.status).toBe(201)
    const row = ctx.db
      .select({ lastUsedAt: apiTokens.lastUsedAt })
      .from(apiTokens)
      .where(eq(apiTokens.id, id))
      .get()
    expect(row?.lastUsedAt).toBeGreaterThan(0)
  })

  it('is judged by the token alone: a cookie beside it is ignored, and a bad token answers 401', async () => {
    const { token } = await newToken(engineer)
    const asEngineer = await admin.get('/api/me').set(bearer(token))
    expect(asEngineer.body.user.email).toBe('engineer@ordinate.test')
    const bad = await admin.get('/api/me').set(bearer('ordt_not-a-real-token'))
    expect(bad.status).toBe(401)
    expect(bad.body.error.code).toBe('unauthorized')
    expect((await admin.get('/api/me').set('authorization', 'Basic abc')).status).toBe(401)
  })

  it('holds only the token’s roles', async () => {
    await addMember(ctx.db, ctx.seed.firmIds[0]!, 'both-roles@ordinate.test', ['engineer', 'checker'])
    const both = await ctx.signIn('both-roles@ordinate.test')
    const { token, roles } = await newToken(both, { name: 'checking only', roles: ['checker'] })
    expect(roles).toEqual(['checker'])
    const res = await script()
      .post('/api/reviews')
      .set(bearer(token))
      .send({ subjectType: 'run', subjectId: recordId })
    expect(res.status).toBe(403)
  })

  it('keeps firm isolation: another firm’s token cannot see this firm’s record', async () => {
    const { token } = await newToken(outsider)
    expect((await script().get(`/api/records/${recordId}`).set(bearer(token))).status).toBe(404)
    const list = await script().get('/api/records').set(bearer(token))
    expect(list.status).toBe(200)
    expect(list.body.items.map((r: { id: string }) => r.id)).not.toContain(recordId)
  })

  it('answers 401 for a revoked token', async () => {
    const { id, token } = await newToken(engineer)
    expect((await script().get('/api/me').set(bearer(token))).status).toBe(200)
    expect((await engineer.delete(`/api/me/tokens/${id}`)).status).toBe(204)
    expect((await script().get('/api/me').set(bearer(token))).status).toBe(401)
    const list = await engineer.get('/api/me/tokens')
    expect(list.body.items.map((t: { id: string }) => t.id)).not.toContain(id)
  })

  it('answers 401 for an expired token', async () => {
    const { id, token } = await newToken(engineer, { name: 'short-lived', expiresAt: Date.now() + 60_000 })
    expect((await script().get('/api/me').set(bearer(token))).status).toBe(200)
    ctx.db
      .update(apiTokens)
      .set({ expiresAt: Date.now() - 1 })
      .where(eq(apiTokens.id, id))
      .run()
    expect((await script().get('/api/me').set(bearer(token))).status).toBe(401)
  })

  it('answers 401 for the token of a member who was removed from the firm', async () => {
    const userId = await addMember(ctx.db, ctx.seed.firmIds[0]!, 'leaving@ordinate.test', ['engineer'])
    const leaving = await ctx.signIn('leaving@ordinate.test')
    const { token } = await newToken(leaving)
    expect((await script().get('/api/records').set(bearer(token))).status).toBe(200)
    const membership = ctx.db
      .select({ id: memberships.id })
      .from(memberships)
      .where(eq(memberships.userId, userId))
      .get()!
    expect((await admin.delete(`/api/firm/members/${membership.id}`)).status).toBe(204)
    expect((await script().get('/api/records').set(bearer(token))).status).toBe(401)
    const firmList = await admin.get('/api/firm/tokens')
    expect(firmList.body.items.map((t: { owner: { id: string } }) => t.owner.id)).not.toContain(userId)
  })
})

describe('DELETE /api/me/tokens/:id', () => {
  it('answers 404 for another member’s token', async () => {
    const { id } = await newToken(engineer)
    const checker = await ctx.signIn('checker@ordinate.test')
    expect((await checker.delete(`/api/me/tokens/${id}`)).status).toBe(404)
  })
})

describe('the firm’s tokens (admins)', () => {
  it('lists every member’s live tokens with their owners, and revokes any of them', async () => {
    const { id, token } = await newToken(engineer, { name: 'for the admin to revoke' })
    const list = await admin.get('/api/firm/tokens')
    expect(list.status).toBe(200)
    expect(list.body.items.find((t: { id: string }) => t.id === id)).toMatchObject({
      name: 'for the admin to revoke',
      owner: { name: 'Ines Marlowe', email: 'engineer@ordinate.test' },
    })
    expect((await admin.delete(`/api/firm/tokens/${id}`)).status).toBe(204)
    expect((await script().get('/api/me').set(bearer(token))).status).toBe(401)
  })

  it('is refused to members who are not admins, and another firm’s admin cannot revoke', async () => {
    const { id } = await newToken(engineer)
    expect((await engineer.get('/api/firm/tokens')).status).toBe(403)
    await addMember(ctx.db, ctx.seed.firmIds[1]!, 'other-admin@ordinate.test', ['admin'])
    const otherAdmin = await ctx.signIn('other-admin@ordinate.test')
    expect((await otherAdmin.delete(`/api/firm/tokens/${id}`)).status).toBe(404)
    const theirs = (await otherAdmin.get('/api/firm/tokens')).body.items as {
      id: string
      owner: { email: string }
    }[]
    expect(theirs.map((t) => t.id)).not.toContain(id)
    expect(theirs.every((t) => t.owner.email === 'outsider@ordinate.test')).toBe(true)
  })
})
