import { readFileSync } from 'node:fs'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { eq } from 'drizzle-orm'
import type request from 'supertest'
import { vi } from 'vitest'
import type { Role } from '../../shared/schemas/accounts.js'
import { rolesFor } from '../../shared/permissions.js'
import type { Db } from '../../server/db/client.js'
import { memberships, users } from '../../server/db/schema.js'
import { newId } from '../../server/ids.js'
import type { AppDeps } from '../../server/deps.js'
import { RunQueue } from '../../server/runs/runQueue.js'
import { hashPassword } from '../../server/services/auth.js'
import { latestMailTo, tokenFromLink } from './mailbox.js'
import type { IdKind, RouteSpec, TokenKind, WorldIds } from './routeTable.js'
import { createTestContext, type TestContext } from './testApp.js'

const RECORD_FIXTURE = path.join(
  path.dirname(fileURLToPath(import.meta.url)),
  '..',
  'fixtures',
  'records',
  'time-value-header.csv',
)

export interface DemoWorld {
  ids: WorldIds
  /** The id a route's `:id` names, by kind. */
  idOf: Record<IdKind, string>
  /** A live token of each kind (an invitation to the demo firm, a reset for its checker). */
  tokenOf: Record<TokenKind, string>
}

function expectStatus(res: request.Response, status: number, what: string) {
  if (res.status !== status) throw new Error(`${what}: ${res.status} ${JSON.stringify(res.body)}`)
}

/** Adds a member to a firm directly (a fast bcrypt cost: these are test accounts). */
export async function addMember(
  db: Db,
  firmId: string,
  email: string,
  roles: Role[],
  name = 'Test Member',
): Promise<string> {
  const userId = newId()
  db.insert(users)
    .values({ id: userId, email, name, passwordHash: await hashPassword('ordinate-demo', 4) })
    .run()
  db.insert(memberships).values({ id: newId(), firmId, userId, roles }).run()
  return userId
}

/**
 * Gives the demo firm one of everything a route can name by id: two uploaded records, a run
 * computed by the context's run queue, a comparison of it, a review of the run, a saved
 * target, a pending invitation and a live password-reset link. Built through the API where
 * the API can build it, so the objects are what members would make.
 */
export async function buildDemoWorld(ctx: TestContext): Promise<DemoWorld> {
  const [engineer, admin] = await Promise.all([
    ctx.signIn('engineer@ordinate.test'),
    ctx.signIn('admin@ordinate.test'),
  ])
  const projectId = ctx.seed.projectIds[0]!
  const bytes = readFileSync(RECORD_FIXTURE)

  const recordIds: string[] = []
  for (const component of ['H1', 'H2']) {
    const res = await engineer
      .post('/api/records')
      .field('name', `Demo world ${component}`)
      .field('component', component)
      .attach('file', bytes, { filename: `world-${component}.csv`, contentType: 'text/csv' })
    expectStatus(res, 201, 'upload')
    recordIds.push(res.body.id)
  }

  // A pair of its own (not of the two records above, which the pair route's sweep pairs itself).
  const pairRecordIds: string[] = []
  for (const component of ['X', 'Y']) {
    const res = await engineer
      .post('/api/records')
      .field('name', `Demo world pair ${component}`)
      .field('component', component)
      .attach('file', bytes, { filename: `world-pair-${component}.csv`, contentType: 'text/csv' })
    expectStatus(res, 201, 'upload')
    pairRecordIds.push(res.body.id)
  }
  const pair = await engineer.post('/api/record-pairs').send({ recordIds: pairRecordIds })
  expectStatus(pair, 201, 'pair')

  if (!ctx.deps.runQueue) throw new Error('buildDemoWorld needs a context with a run queue')
  const queued = await engineer
    .post('/api/runs')
    .send({ recordId: recordIds[0], dampingRatios: [0.05], periodsS: [0.1, 0.2, 0.5, 1, 2] })
  expectStatus(queued, 202, 'run')
  const runId: string = queued.body.id
  await vi.waitFor(
    async () => {
      const run = await engineer.get(`/api/runs/${runId}`)
      if (run.body.status !== 'succeeded') throw new Error(`run ${run.body.status} ${run.body.error ?? ''}`)
    },
    { timeout: 30_000, interval: 50 },
  )
  const batch = await engineer
    .post('/api/run-batches')
    .send({ recordIds: [recordIds[1]], dampingRatios: [0.05], periodsS: [0.2, 1] })
  expectStatus(batch, 202, 'batch')
  await vi.waitFor(
    async () => {
      const res = await engineer.get(`/api/run-batches/${batch.body.id}`)
      if (!res.body.finished) throw new Error(`batch ${JSON.stringify(res.body.counts)}`)
    },
    { timeout: 30_000, interval: 50 },
  )
  const apiToken = await engineer.post('/api/me/tokens').send({ name: 'Demo world script' })
  expectStatus(apiToken, 201, 'API token')
  const comparison = await engineer
    .post('/api/comparisons')
    .send({ name: 'Demo world suite', runIds: [runId], dampingRatio: 0.05 })
  expectStatus(comparison, 201, 'comparison')
  const review = await engineer.post('/api/reviews').send({ subjectType: 'run', subjectId: runId })
  expectStatus(review, 201, 'review')
  const target = await engineer
    .post('/api/targets')
    .send({ name: 'Demo world target', definition: { kind: 'asce7-two-period', sdsG: 1, sd1G: 0.6, tlS: 8 } })
  expectStatus(target, 201, 'target')

  const invitation = await admin
    .post('/api/firm/invitations')
    .send({ email: 'world-invitee@ordinate.test', roles: ['engineer'] })
  expectStatus(invitation, 201, 'invitation')
  const invitationToken = tokenFromLink(
    latestMailTo(ctx.db, 'world-invitee@ordinate.test')!.textBody,
    '/invitations/',
  )
  expectStatus(
    await ctx.anonymous().post('/api/auth/password-reset').send({ email: 'checker@ordinate.test' }),
    202,
    'reset',
  )
  const resetToken = tokenFromLink(
    latestMailTo(ctx.db, 'checker@ordinate.test')!.textBody,
    '/reset-password/',
  )

  const ids: WorldIds = {
    projectId,
    recordIds: [recordIds[0]!, recordIds[1]!],
    runId,
    comparisonId: comparison.body.comparison.id,
    reviewId: review.body.id,
    membershipId: membershipOf(ctx, 'checker@ordinate.test'),
    invitationId: invitation.body.id,
    targetId: target.body.id,
  }
  return {
    ids,
    idOf: {
      record: ids.recordIds[0],
      run: ids.runId,
      comparison: ids.comparisonId,
      review: ids.reviewId,
      membership: ids.membershipId,
      invitation: ids.invitationId,
      project: ids.projectId,
      batch: batch.body.id,
      pair: pair.body.id,
      apiToken: apiToken.body.id,
    },
    tokenOf: { invitation: invitationToken, reset: resetToken },
  }
}

function membershipOf(ctx: TestContext, email: string): string {
  const userId = ctx.seed.userIds[email]!
  const row = ctx.db
    .select({ id: memberships.id })
    .from(memberships)
    .where(eq(memberships.userId, userId))
    .get()
  if (!row) throw new Error(`no membership for ${email}`)
  return row.id
}

/** A test context holding the demo world, its run queue, and the demo members signed in. */
export interface WorldContext {
  ctx: TestContext
  world: DemoWorld
  members: Record<Role, request.Agent>
  /** An agent the route's role check lets through (anonymous for public routes). */
  agentFor(route: RouteSpec): request.Agent
  close(): Promise<void>
}

/**
 * For the sweeps over the route table: a fresh app with a one-thread run queue and rate limits
 * high enough for hundreds of refused requests from one address, then the demo world.
 */
export async function createWorldContext(extend: (deps: AppDeps) => void = () => {}): Promise<WorldContext> {
  let queue: RunQueue | undefined
  const ctx = await createTestContext(
    (deps) => {
      queue = new RunQueue({ db: deps.db, workerCount: 1, runTimeLimitS: 60 })
      deps.runQueue = queue
      extend(deps)
    },
    {
      SIGN_IN_MAX_FAILURES_PER_ADDRESS: '10000',
      SIGN_IN_MAX_FAILURES_PER_EMAIL: '10000',
      PASSWORD_RESET_MAX_PER_WINDOW: '10000',
    },
  )
  queue!.start()
  const world = await buildDemoWorld(ctx)
  const [engineer, checker, admin] = await Promise.all(
    ['engineer', 'checker', 'admin'].map((role) => ctx.signIn(`${role}@ordinate.test`)),
  )
  const members = { engineer: engineer!, checker: checker!, admin: admin! }
  return {
    ctx,
    world,
    members,
    agentFor: (r) =>
      r.access === 'public'
        ? ctx.anonymous()
        : r.access === 'member'
          ? members.engineer
          : members[rolesFor(r.access)[0]!],
    async close() {
      await queue?.stop(0)
      ctx.close()
    },
  }
}
