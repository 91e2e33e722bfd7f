import { and, asc, eq, sql } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type request from 'supertest'
import { auditLog, comparisons, mailOutbox, memberships, users } from '../../server/db/schema.js'
import { newId } from '../../server/ids.js'
import { insertSucceededRun, markRunQueued } from '../support/comparisonFixtures.js'
import { createTestContext, signInDemoMembers, type TestContext } from '../support/testApp.js'

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
  const runBy = (email: string, name: string) =>
    insertSucceededRun(
      ctx.db,
      { firmId, projectId, userId: ctx.seed.userIds[email] ?? bothId },
      { name, periodsS, curves },
    )
  engineerRun = runBy('engineer@ordinate.test', 'Synthetic east-west')
  checkerRun = runBy('checker@ordinate.test', 'Synthetic north-south')
  bothRun = runBy('both@ordinate.test', 'Synthetic vertical')
  unfinishedRun = runBy('engineer@ordinate.test', 'Synthetic unfinished')
  markRunQueued(ctx.db, unfinishedRun)
  ;({ engineer, checker, admin, outsider } = await signInDemoMembers(ctx))
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

describe('checkers never change the work they sign off (issue 12, defects 1 and 2)', () => {
  let comparisonId: string
  let reviewId: string
  const patch = (agent: request.Agent, body: Record<string, unknown>) =>
    agent.patch(`/api/comparisons/${comparisonId}`).send(body)
  const stored = () =>
    ctx.db
      .select({ name: comparisons.name, revision: comparisons.revision })
      .from(comparisons)
      .where(eq(comparisons.id, comparisonId))
      .get()

  beforeAll(async () => {
    const res = await engineer
      .post('/api/comparisons')
      .send({ name: 'Checked suite', runIds: [engineerRun], dampingRatio: 0.05 })
    expect(res.status).toBe(201)
    comparisonId = res.body.comparison.id
  })

  it('a checker cannot edit an engineer’s draft (403), and nothing changes', async () => {
    const res = await patch(checker, { name: 'Changed by the checker' })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/checker changes only work they made/)
    expect(stored()).toEqual({ name: 'Checked suite', revision: 1 })
  })

  it('a checker may edit a draft they made themselves', async () => {
    const own = await checker
      .post('/api/comparisons')
      .send({ name: 'Independent check', runIds: [checkerRun], dampingRatio: 0.05 })
    expect(own.status).toBe(201)
    const res = await checker
      .patch(`/api/comparisons/${own.body.comparison.id}`)
      .send({ name: 'Independent check B' })
    expect(res.status).toBe(200)
    expect(res.body.comparison).toMatchObject({ name: 'Independent check B', revision: 1 })
  })

  it('submitted work changes for nobody (409 under_review)', async () => {
    const submitted = await engineer
      .post('/api/reviews')
      .send({ subjectType: 'comparison', subjectId: comparisonId })
    expect(submitted.status).toBe(201)
    reviewId = submitted.body.id
    for (const agent of [engineer, checker]) {
      const res = await patch(agent, { name: 'Changed while under review' })
      expect(res.status).toBe(409)
      expect(res.body.error.code).toBe('under_review')
    }
    expect(stored()).toEqual({ name: 'Checked suite', revision: 1 })
  })

  it('after returning it, the checker still cannot change it (403)', async () => {
    const returned = await checker
      .post(`/api/reviews/${reviewId}/decision`)
      .send({ decision: 'returned', comment: 'Use the 5% curves of both runs.' })
    expect(returned.status).toBe(200)
    const res = await patch(checker, { name: 'Changed by the checker after the return' })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/returned to the engineer/)
    expect(stored()).toEqual({ name: 'Checked suite', revision: 1 })
  })

  it('each change to returned work makes a new revision, shown by the sheet, the file name and the thread', async () => {
    const first = await patch(engineer, { name: 'Checked suite, corrected' })
    expect(first.status).toBe(200)
    expect(first.body.comparison).toMatchObject({ name: 'Checked suite, corrected', revision: 2 })
    const second = await patch(engineer, { meanKind: 'arithmetic' })
    expect(second.body.comparison.revision).toBe(3)
    expect(stored()).toEqual({ name: 'Checked suite, corrected', revision: 3 })

    const sheet = await engineer.get(`/api/comparisons/${comparisonId}/sheet`)
    expect(sheet.status).toBe(200)
    expect(sheet.body.revision).toBe(3)
    const file = await engineer.get(`/api/comparisons/${comparisonId}/export.csv`)
    expect(file.status).toBe(200)
    expect(file.headers['content-disposition']).toMatch(/-rev3-suite-comparison-checked-suite-corrected\.csv/)

    const thread = await checker.get(`/api/reviews/${reviewId}`)
    expect(thread.body.comments.map((c: { body: string }) => c.body)).toEqual([
      'Use the 5% curves of both runs.',
      'Revision 2 saved (changed: name).',
      'Revision 3 saved (changed: meanKind).',
    ])
    expect(thread.body.subjectRevision).toBe(3)
  })

  it('a checker who changed the work cannot check it; another checker can', async () => {
    // `both` holds the engineer role too, so may change returned work, and then may not check it.
    const changed = await patch(both, { name: 'Checked suite, rev 4' })
    expect(changed.status).toBe(200)
    expect(changed.body.comparison.revision).toBe(4)
    expect(
      (await engineer.post('/api/reviews').send({ subjectType: 'comparison', subjectId: comparisonId }))
        .status,
    ).toBe(200)
    const refused = await both.post(`/api/reviews/${reviewId}/decision`).send({ decision: 'checked' })
    expect(refused.status).toBe(403)
    expect(refused.body.error.message).toMatch(/You changed this work yourself/)
    const checked = await checker.post(`/api/reviews/${reviewId}/decision`).send({ decision: 'checked' })
    expect(checked.status).toBe(200)
    expect(checked.body).toMatchObject({ state: 'checked', subjectRevision: 4 })
  })

  it('checked work is locked for everyone (409 locked)', async () => {
    for (const agent of [engineer, checker, both]) {
      const res = await patch(agent, { name: 'After the check' })
      expect(res.status).toBe(409)
      expect(res.body.error.code).toBe('locked')
    }
    expect(stored()).toEqual({ name: 'Checked suite, rev 4', revision: 4 })
  })
})

describe('review notices by e-mail (issue 15)', () => {
  const NAME = 'Notice suite'
  /** The outbox messages about this comparison, as [recipient, subject] pairs, oldest first. */
  const notices = () =>
    ctx.db
      .select({ to: mailOutbox.toAddress, subject: mailOutbox.subject, text: mailOutbox.textBody })
      .from(mailOutbox)
      .orderBy(asc(mailOutbox.createdAt), asc(sql`rowid`))
      .all()
      .filter((m) => m.subject.includes(`“${NAME}”`))
  let comparisonId: string
  let reviewId: string

  it("submitting e-mails the firm's checkers, not the submitter, linking to the work", async () => {
    const made = await engineer
      .post('/api/comparisons')
      .send({ name: NAME, runIds: [engineerRun], dampingRatio: 0.05 })
    comparisonId = made.body.comparison.id
    const submitted = await engineer
      .post('/api/reviews')
      .send({ subjectType: 'comparison', subjectId: comparisonId })
    expect(submitted.status).toBe(201)
    reviewId = submitted.body.id
    const sent = notices()
    expect(sent.map((m) => m.to).sort()).toEqual(['both@ordinate.test', 'checker@ordinate.test'])
    for (const m of sent) {
      expect(m.subject).toBe(`Ines Marlowe submitted comparison “${NAME}” for checking`)
      expect(m.text).toContain(`/comparisons/${comparisonId}`)
      expect(m.text).toContain('(revision 1)')
    }
  })

  it('returning e-mails the engineer with the comment; checking e-mails them again', async () => {
    await checker
      .post(`/api/reviews/${reviewId}/decision`)
      .send({ decision: 'returned', comment: 'State the period range used.' })
    const returned = notices().at(-1)!
    expect(returned.to).toBe('engineer@ordinate.test')
    expect(returned.subject).toBe(`Tomas Verhoek returned comparison “${NAME}” with comments`)
    expect(returned.text).toContain('“State the period range used.”')

    await engineer.patch(`/api/comparisons/${comparisonId}`).send({ meanKind: 'arithmetic' })
    await engineer.post('/api/reviews').send({ subjectType: 'comparison', subjectId: comparisonId })
    await checker.post(`/api/reviews/${reviewId}/decision`).send({ decision: 'checked' })
    const checked = notices().at(-1)!
    expect(checked.to).toBe('engineer@ordinate.test')
    expect(checked.subject).toBe(`Tomas Verhoek checked comparison “${NAME}”`)
    expect(checked.text).toContain('(revision 2)')
    expect(notices().filter((m) => m.to === 'admin@ordinate.test')).toEqual([])
  })

  it('a refused decision queues no mail', async () => {
    const before = notices().length
    const res = await checker.post(`/api/reviews/${reviewId}/decision`).send({ decision: 'checked' })
    expect(res.status).toBe(409)
    expect(notices()).toHaveLength(before)
  })
})
