import { and, asc, eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type request from 'supertest'
import { auditLog, memberships, users } from '../../server/db/schema.js'
import { newId } from '../../server/ids.js'
import { insertSucceededRun, markRunQueued } from '../support/comparisonFixtures.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
let engineer: request.Agent
let checker: request.Agent
let admin: request.Agent
let outsider: request.Agent
let both: request.Agent
let engineerRun: string
let checkerRun: string
let bothRun: string
let unfinishedRun: string
const curves = [{ dampingRatio: 0.05, psaG: [0.5, 0.8, 0.3] }]
const periodsS = [0.2, 0.5, 1]

beforeAll(async () => {
  ctx = await createTestContext()
  const firmId = ctx.seed.firmIds[0] as string
  const projectId = ctx.seed.projectIds[0] as string
  // A member holding both engineer and checker roles, to show nobody checks their own work.
  const bothId = newId()
  const hash = ctx.db
    .select({ h: users.passwordHash })
    .from(users)
    .where(eq(users.id, ctx.seed.userIds['engineer@ordinate.test'] as string))
    .get()?.h as string
  ctx.db
    .insert(users)
    .values({ id: bothId, email: 'both@ordinate.test', name: 'Avery Lindqvist', passwordHash: hash })
    .run()
  ctx.db
    .insert(memberships)
    .values({ id: newId(), firmId, userId: bothId, roles: ['engineer', 'checker'] })
    .run()
  const by = (email: string) => ({ firmId, projectId, userId: ctx.seed.userIds[email] ?? bothId })
  engineerRun = insertSucceededRun(ctx.db, by('engineer@ordinate.test'), {
    name: 'Synthetic east-west',
    periodsS,
    curves,
  })
  checkerRun = insertSucceededRun(ctx.db, by('checker@ordinate.test'), {
    name: 'Synthetic north-south',
    periodsS,
    curves,
  })
  bothRun = insertSucceededRun(ctx.db, by('both@ordinate.test'), {
    name: 'Synthetic vertical',
    periodsS,
    curves,
  })
  unfinishedRun = insertSucceededRun(ctx.db, by('engineer@ordinate.test'), {
    name: 'Synthetic unfinished',
    periodsS,
    curves,
  })
  markRunQueued(ctx.db, unfinishedRun)
  engineer = await ctx.signIn('engineer@ordinate.test')
  checker = await ctx.signIn('checker@ordinate.test')
  admin = await ctx.signIn('admin@ordinate.test')
  outsider = await ctx.signIn('outsider@ordinate.test')
  both = await ctx.signIn('both@ordinate.test')
})
afterAll(() => ctx.close())

function auditActions(subjectId: string): string[] {
  return ctx.db
    .select({ action: auditLog.action })
    .from(auditLog)
    .where(and(eq(auditLog.subjectId, subjectId)))
    .orderBy(asc(auditLog.id))
    .all()
    .map((r) => r.action)
    .filter((a) => a.startsWith('review.'))
}

describe('review transitions of a run', () => {
  let reviewId: string

  it('an engineer submits their own run: draft → submitted (201)', async () => {
    const res = await engineer.post('/api/reviews').send({ subjectType: 'run', subjectId: engineerRun })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({
      state: 'submitted',
      subjectName: 'Synthetic east-west',
      submittedBy: { name: 'Ines Marlowe' },
      decidedBy: null,
    })
    reviewId = res.body.id
  })

  it('a second submission while waiting answers 409', async () => {
    const res = await engineer.post('/api/reviews').send({ subjectType: 'run', subjectId: engineerRun })
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('already_submitted')
  })

  it('the checker’s queue lists it; the engineer’s own submissions too', async () => {
    const queue = await checker.get('/api/reviews').query({ state: 'submitted' })
    expect(queue.body.items.map((r: { id: string }) => r.id)).toContain(reviewId)
    const mine = await engineer.get('/api/reviews').query({ mine: 'true' })
    expect(mine.body.items.map((r: { id: string }) => r.id)).toEqual([reviewId])
    expect((await checker.get('/api/reviews').query({ mine: 'true' })).body.items).toEqual([])
  })

  it('a return needs a comment (400)', async () => {
    const res = await checker.post(`/api/reviews/${reviewId}/decision`).send({ decision: 'returned' })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/comment/)
  })

  it('the checker returns it with a comment: submitted → returned', async () => {
    const res = await checker
      .post(`/api/reviews/${reviewId}/decision`)
      .send({ decision: 'returned', comment: 'Baseline drift visible after 30 s; correct and re-run.' })
    expect(res.status).toBe(200)
    expect(res.body.state).toBe('returned')
    expect(res.body.decidedBy.name).toBe('Tomas Verhoek')
    expect(res.body.comments.map((c: { body: string }) => c.body)).toEqual([
      'Baseline drift visible after 30 s; correct and re-run.',
    ])
  })

  it('a decision on a returned review answers 409', async () => {
    expect(
      (await checker.post(`/api/reviews/${reviewId}/decision`).send({ decision: 'checked' })).status,
    ).toBe(409)
  })

  it('the engineer answers in the thread and resubmits: returned → submitted (200)', async () => {
    const comment = await engineer
      .post(`/api/reviews/${reviewId}/comments`)
      .send({ body: 'Corrected the baseline; please look again.' })
    expect(comment.status).toBe(201)
    expect(comment.body.author.name).toBe('Ines Marlowe')
    const res = await engineer.post('/api/reviews').send({ subjectType: 'run', subjectId: engineerRun })
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({ id: reviewId, state: 'submitted', decidedBy: null, commentCount: 2 })
  })

  it('the checker marks it checked: submitted → checked; it is then locked', async () => {
    const res = await checker
      .post(`/api/reviews/${reviewId}/decision`)
      .send({ decision: 'checked', comment: 'Agreed.' })
    expect(res.status).toBe(200)
    expect(res.body.state).toBe('checked')
    const again = await engineer.post('/api/reviews').send({ subjectType: 'run', subjectId: engineerRun })
    expect(again.status).toBe(409)
    expect(again.body.error.code).toBe('locked')
  })

  it('writes every transition to the audit log with who and when', () => {
    expect(auditActions(engineerRun)).toEqual([
      'review.submitted',
      'review.returned',
      'review.commented',
      'review.resubmitted',
      'review.checked',
    ])
    const rows = ctx.db.select().from(auditLog).where(eq(auditLog.subjectId, engineerRun)).all()
    const checked = rows.find((r) => r.action === 'review.checked')
    expect(checked?.userId).toBe(ctx.seed.userIds['checker@ordinate.test'])
    expect(checked?.createdAt).toEqual(expect.any(Number))
    expect(checked?.detail).toMatchObject({ from: 'submitted', to: 'checked' })
  })

  it('GET /api/reviews/:id answers the thread in order', async () => {
    const res = await admin.get(`/api/reviews/${reviewId}`)
    expect(res.status).toBe(200)
    expect(res.body.comments.map((c: { author: { name: string } }) => c.author.name)).toEqual([
      'Tomas Verhoek',
      'Ines Marlowe',
      'Tomas Verhoek',
    ])
  })
})

describe('who may do what', () => {
  it('an engineer cannot submit someone else’s run (403)', async () => {
    const res = await engineer.post('/api/reviews').send({ subjectType: 'run', subjectId: checkerRun })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/own work/)
  })

  it('a checker or an admin cannot submit (403 naming the engineer role)', async () => {
    for (const agent of [checker, admin]) {
      const res = await agent.post('/api/reviews').send({ subjectType: 'run', subjectId: checkerRun })
      expect(res.status).toBe(403)
      expect(res.body.error.message).toMatch(/engineer/)
    }
  })

  it('a run that has not succeeded cannot be submitted (409)', async () => {
    const res = await engineer.post('/api/reviews').send({ subjectType: 'run', subjectId: unfinishedRun })
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('run_not_finished')
  })

  it('nobody checks work they submitted: an engineer-checker is refused on their own run (403)', async () => {
    const submitted = await both.post('/api/reviews').send({ subjectType: 'run', subjectId: bothRun })
    expect(submitted.status).toBe(201)
    const res = await both.post(`/api/reviews/${submitted.body.id}/decision`).send({ decision: 'checked' })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/yourself/)
    expect(auditActions(bothRun)).toEqual(['review.submitted'])
    // Another checker may decide.
    expect(
      (await checker.post(`/api/reviews/${submitted.body.id}/decision`).send({ decision: 'checked' })).status,
    ).toBe(200)
  })

  it('nobody checks a comparison that contains a run they ran (403)', async () => {
    const comparison = await engineer
      .post('/api/comparisons')
      .send({ name: 'Mixed authors', runIds: [engineerRun, checkerRun], dampingRatio: 0.05 })
    expect(comparison.status).toBe(201)
    const submitted = await engineer
      .post('/api/reviews')
      .send({ subjectType: 'comparison', subjectId: comparison.body.comparison.id })
    expect(submitted.status).toBe(201)
    const res = await checker.post(`/api/reviews/${submitted.body.id}/decision`).send({ decision: 'checked' })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/ran part of this work/)
    expect(
      (
        await both
          .post(`/api/reviews/${submitted.body.id}/decision`)
          .send({ decision: 'returned', comment: 'Add the third record.' })
      ).status,
    ).toBe(200)
  })

  it('an engineer or an admin cannot decide (403 naming the checker role)', async () => {
    const submitted = await engineer.post('/api/reviews').send({
      subjectType: 'comparison',
      subjectId: (
        await engineer
          .post('/api/comparisons')
          .send({ name: 'Solo', runIds: [engineerRun], dampingRatio: 0.05 })
      ).body.comparison.id,
    })
    for (const agent of [engineer, admin]) {
      const res = await agent.post(`/api/reviews/${submitted.body.id}/decision`).send({ decision: 'checked' })
      expect(res.status).toBe(403)
      expect(res.body.error.message).toMatch(/checker/)
    }
  })

  it('another firm gets 404 for a review and a subject, and sees no reviews', async () => {
    const [first] = (await checker.get('/api/reviews')).body.items
    expect((await outsider.get(`/api/reviews/${first.id}`)).status).toBe(404)
    expect((await outsider.post(`/api/reviews/${first.id}/comments`).send({ body: 'hi' })).status).toBe(404)
    expect(
      (await outsider.post('/api/reviews').send({ subjectType: 'run', subjectId: engineerRun })).status,
    ).toBe(404)
    expect((await outsider.get('/api/reviews')).body.items).toEqual([])
  })

  it('bad input answers 400', async () => {
    expect(
      (await engineer.post('/api/reviews').send({ subjectType: 'record', subjectId: engineerRun })).status,
    ).toBe(400)
    expect((await engineer.get('/api/reviews').query({ state: 'draft' })).status).toBe(400)
    const [first] = (await checker.get('/api/reviews')).body.items
    expect((await checker.post(`/api/reviews/${first.id}/comments`).send({ body: '   ' })).status).toBe(400)
    expect(
      (await checker.post(`/api/reviews/${first.id}/decision`).send({ decision: 'approved' })).status,
    ).toBe(400)
  })

  it('lists filter by subject', async () => {
    const res = await checker.get('/api/reviews').query({ subjectType: 'run', subjectId: engineerRun })
    expect(res.body.items).toHaveLength(1)
    expect(res.body.items[0]).toMatchObject({
      subjectType: 'run',
      subjectId: engineerRun,
      state: 'checked',
      subjectAuthor: { name: 'Ines Marlowe' },
    })
  })
})
