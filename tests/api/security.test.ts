import bcrypt from 'bcryptjs'
import { eq } from 'drizzle-orm'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ACTIONS, rolesFor } from '../../shared/permissions.js'
import type { Role } from '../../shared/schemas/accounts.js'
import type { SmtpSink } from '../../server/mail/smtpSink.js'
import { apiTokens, memberships, users } from '../../server/db/schema.js'
import { BCRYPT_COST, dummyPasswordHash } from '../../server/services/auth.js'
import { snapshotDb } from '../support/dbSnapshot.js'
import { addMember, createWorldContext, type DemoWorld, type WorldContext } from '../support/demoWorld.js'
import {
  type RouteSpec,
  fillPath,
  isStateChanging,
  mountedApiRoutes,
  routeKey,
  routeTable,
} from '../support/routeTable.js'
import type { TestContext } from '../support/testApp.js'

/**
 * Sweeps over every route of the API (tests/support/routeTable.ts): signed-out visitors, missing
 * roles, another firm's ids, malformed ids and cross-site requests. Each refusal must come in the
 * one error shape and leave the database as it was.
 */
let w: WorldContext
let ctx: TestContext
let world: DemoWorld
let demo: WorldContext['members']
/** A member of the second firm holding every role, so only firm scoping stands between them and the demo firm's data. */
let outsider: request.Agent

beforeAll(async () => {
  w = await createWorldContext((deps) => {
    // Stands in for the in-process SMTP sink so the development mailbox route is mounted too.
    deps.devMailbox = { messages: () => [] } as unknown as SmtpSink
  })
  ;({ ctx, world, members: demo } = w)
  await addMember(
    ctx.db,
    ctx.seed.firmIds[1]!,
    'outsider-admin@ordinate.test',
    ['engineer', 'checker', 'admin'],
    'Oda Brightwater',
  )
  outsider = await ctx.signIn('outsider-admin@ordinate.test')
})
afterAll(() => w?.close())

const label = (r: RouteSpec) => routeKey(r)
const pathOf = (r: RouteSpec, id?: string) =>
  fillPath(r, {
    id: id ?? (r.id ? world.idOf[r.id] : undefined),
    token: r.token ? world.tokenOf[r.token] : undefined,
  })

/** Sends the route's request: its valid body (or a one-line upload) so only the check under test can refuse it. */
function send(
  agent: Pick<request.Agent, 'get' | 'post' | 'patch' | 'delete'>,
  r: RouteSpec,
  path = pathOf(r),
) {
  const method = r.method.toLowerCase() as 'get' | 'post' | 'patch' | 'delete'
  const req = agent[method](path)
  if (r.body === 'multipart') {
    return req
      .field('units', 'g')
      .field('dtS', '0.01')
      .attach('file', Buffer.from('0\n0.01\n'.repeat(20)), 'r.txt')
  }
  return r.body === 'json' ? req.send(r.validBody!(world.ids)) : req
}

function expectErrorShape(res: request.Response, status: number, code: string) {
  expect(res.status, `${res.status} ${JSON.stringify(res.body)}`).toBe(status)
  expect(res.type).toBe('application/json')
  expect(Object.keys(res.body)).toEqual(['error'])
  expect(res.body.error.code).toBe(code)
  expect(typeof res.body.error.message).toBe('string')
}

describe('the route table', () => {
  it('lists exactly the routes createApp() mounts under /api, so a new route needs an entry', () => {
    expect(mountedApiRoutes(ctx.app).sort()).toEqual(routeTable.map(routeKey).sort())
  })

  it('guards a route with every action of shared/permissions.ts but the one a service checks', () => {
    // Deleting someone else's record is checked by the record service: the route is open to members.
    const unrouted = ACTIONS.filter((action) => !routeTable.some((r) => r.access === action))
    expect(unrouted).toEqual(['records.removeAny'])
  })

  it('says what every :id and :token names, and gives every JSON route a valid body', () => {
    for (const r of routeTable) {
      expect(r.path.includes(':id'), label(r)).toBe(r.id !== undefined)
      expect(r.path.includes(':token'), label(r)).toBe(r.token !== undefined)
      expect(r.body === 'json', label(r)).toBe(r.validBody !== undefined)
    }
  })
})

describe('signed-out visitors', () => {
  for (const r of routeTable.filter((r) => r.access !== 'public')) {
    it(`${label(r)} answers 401 and writes nothing`, async () => {
      const before = snapshotDb(ctx.db)
      expectErrorShape(await send(ctx.anonymous(), r), 401, 'unauthorized')
      expect(snapshotDb(ctx.db)).toEqual(before)
    })
  }
})

describe('role checks', () => {
  const ROLES: Role[] = ['engineer', 'checker', 'admin']
  for (const r of routeTable) {
    if (r.access === 'public' || r.access === 'member') continue
    const allowed = rolesFor(r.access)
    for (const role of ROLES.filter((x) => !allowed.includes(x))) {
      it(`${label(r)} refuses a member holding only the ${role} role with 403 naming the role needed`, async () => {
        const before = snapshotDb(ctx.db)
        const res = await send(demo[role], r)
        expectErrorShape(res, 403, 'forbidden')
        for (const needed of allowed) expect(res.body.error.message).toContain(needed)
        expect(snapshotDb(ctx.db)).toEqual(before)
      })
    }
  }
})

describe("another firm's ids", () => {
  for (const r of routeTable.filter((r) => r.id)) {
    it(`${label(r)} answers 404 to a member of another firm holding every role, and writes nothing`, async () => {
      const before = snapshotDb(ctx.db)
      expectErrorShape(await send(outsider, r), 404, 'not_found')
      expect(snapshotDb(ctx.db)).toEqual(before)
    })
  }

  for (const r of routeTable.filter((r) => r.id && r.method === 'GET')) {
    it(`${label(r)} does answer the demo firm's own members (the ids are real)`, async () => {
      const res = await send(demo.engineer, r)
      expect(res.status, JSON.stringify(res.body)).toBe(200)
    })
  }

  for (const r of routeTable.filter((r) => r.foreignIds)) {
    it(`${label(r)} with the demo firm's ids in its ${r.method === 'GET' ? 'query' : 'body'} reveals nothing and writes nothing`, async () => {
      const before = snapshotDb(ctx.db)
      const { query, body } = r.foreignIds!(world.ids)
      const method = r.method.toLowerCase() as 'get' | 'post'
      const res = await outsider[method](pathOf(r))
        .query(query ?? {})
        .send(body)
      if (res.status === 200) expect(res.body.items).toEqual([])
      else expectErrorShape(res, 404, 'not_found')
      expect(snapshotDb(ctx.db)).toEqual(before)
    })
  }
})

describe('malformed ids and tokens', () => {
  for (const r of routeTable.filter((r) => r.id || r.token)) {
    it(`${label(r)} answers 400 naming the parameter for an id that is not one`, async () => {
      const path = fillPath(r, { id: 'not-an-id', token: 'not-a-token' })
      const res = await send(w.agentFor(r), r, path)
      expectErrorShape(res, 400, 'invalid_input')
      expect(res.body.error.message).toMatch(r.id ? /^id:/ : /^token:/)
    })
  }
})

describe('cross-site requests', () => {
  const bare = new Map<string, request.Agent>()
  /** A signed-in agent that sends no CSRF header of its own (it signs in same-origin). */
  async function bareAgent(email: string) {
    const known = bare.get(email)
    if (known) return known
    const agent = request.agent(ctx.app)
    const res = await agent
      .post('/api/auth/sign-in')
      .set('x-ordinate-client', '1')
      .send({ email, password: 'ordinate-demo' })
    expect(res.status).toBe(200)
    bare.set(email, agent)
    return agent
  }
  const emailFor = (r: RouteSpec) =>
    r.access === 'public' || r.access === 'member'
      ? 'engineer@ordinate.test'
      : `${rolesFor(r.access)[0]}@ordinate.test`

  for (const r of routeTable.filter(isStateChanging)) {
    it(`${label(r)} refuses a foreign Origin, and a request with no Origin, Referer or client header, with 403`, async () => {
      const agent = await bareAgent(emailFor(r))
      const before = snapshotDb(ctx.db)
      const foreign = await send(agent, r).set('origin', 'https://elsewhere.example')
      expectErrorShape(foreign, 403, 'forbidden')
      expect(foreign.body.error.message).toMatch(/Cross-site/)
      const foreignReferer = await send(agent, r).set('referer', 'https://elsewhere.example/page')
      expectErrorShape(foreignReferer, 403, 'forbidden')
      const unmarked = await send(agent, r)
      expectErrorShape(unmarked, 403, 'forbidden')
      expect(snapshotDb(ctx.db)).toEqual(before)
    })
  }
})

describe('API tokens (Authorization: Bearer)', () => {
  const ROLES: Role[] = ['engineer', 'checker', 'admin']
  /** What a script sends: no cookie and no CSRF header, only the token. */
  const asScript = (r: RouteSpec, token: string, path?: string) =>
    send(request(ctx.app), r, path).set('authorization', `Bearer ${token}`)
  /** Every table but api_tokens, whose last-use time a token that authenticates updates by design. */
  const snapshotBesideTokens = () => {
    const { api_tokens: _lastUse, ...rest } = snapshotDb(ctx.db)
    return rest
  }
  /** Tokens of a demo-firm member holding every role, each narrowed to one role. */
  const onlyRole = {} as Record<Role, string>
  /** A token with every role of the demo firm, and one of the second firm's. */
  let everyRole: string
  let foreignFirm: string
  /** Tokens that no longer open anything: revoked, expired, and of a member since removed. */
  const dead: Record<'revoked' | 'expired' | 'of a removed member', string> = {
    revoked: '',
    expired: '',
    'of a removed member': '',
  }

  beforeAll(async () => {
    const firmId = ctx.seed.firmIds[0]!
    const everyRoleOf = async (email: string) => {
      const userId = await addMember(ctx.db, firmId, email, ROLES, 'Sweep Member')
      return { userId, agent: await ctx.signIn(email) }
    }
    const mint = async (agent: request.Agent, body: Record<string, unknown>) => {
      const res = await agent.post('/api/me/tokens').send(body)
      expect(res.status, JSON.stringify(res.body)).toBe(201)
      return res.body as { id: string; token: string }
    }
    const { agent } = await everyRoleOf('sweep-all-roles@ordinate.test')
    for (const role of ROLES)
      onlyRole[role] = (await mint(agent, { name: `${role} only`, roles: [role] })).token
    everyRole = (await mint(agent, { name: 'every role' })).token
    foreignFirm = (await mint(outsider, { name: 'second firm' })).token

    const revoked = await mint(agent, { name: 'revoked' })
    expect((await agent.delete(`/api/me/tokens/${revoked.id}`)).status).toBe(204)
    dead.revoked = revoked.token
    const expired = await mint(agent, { name: 'expired', expiresAt: Date.now() + 60_000 })
    ctx.db
      .update(apiTokens)
      .set({ expiresAt: Date.now() - 1000 })
      .where(eq(apiTokens.id, expired.id))
      .run()
    dead.expired = expired.token
    const leaver = await everyRoleOf('sweep-leaver@ordinate.test')
    dead['of a removed member'] = (await mint(leaver.agent, { name: 'leaver' })).token
    const { id: membershipId } = ctx.db
      .select({ id: memberships.id })
      .from(memberships)
      .where(eq(memberships.userId, leaver.userId))
      .get()!
    expect((await demo.admin.delete(`/api/firm/members/${membershipId}`)).status).toBe(204)
  })

  for (const r of routeTable) {
    if (r.access === 'public' || r.access === 'member') continue
    const allowed = rolesFor(r.access)
    for (const role of ROLES.filter((x) => !allowed.includes(x))) {
      it(`${label(r)} refuses a token narrowed to the ${role} role with 403 naming the role needed`, async () => {
        const before = snapshotBesideTokens()
        const res = await asScript(r, onlyRole[role])
        expectErrorShape(res, 403, 'forbidden')
        for (const needed of allowed) expect(res.body.error.message).toContain(needed)
        expect(snapshotBesideTokens()).toEqual(before)
      })
    }
  }

  for (const r of routeTable.filter((r) => r.access !== 'public')) {
    it(`${label(r)} answers 401 to a revoked or expired token and to a removed member's, writing nothing`, async () => {
      const before = snapshotDb(ctx.db)
      for (const [which, token] of Object.entries(dead)) {
        const res = await asScript(r, token)
        expect(res.status, `${which} token`).toBe(401)
        expectErrorShape(res, 401, 'unauthorized')
      }
      expect(snapshotDb(ctx.db)).toEqual(before)
    })
  }

  for (const r of routeTable.filter((r) => r.id)) {
    it(`${label(r)} answers 404 to another firm's token holding every role, from any Origin, writing nothing`, async () => {
      const before = snapshotBesideTokens()
      const res = await asScript(r, foreignFirm).set('origin', 'https://elsewhere.example')
      expectErrorShape(res, 404, 'not_found')
      expect(snapshotBesideTokens()).toEqual(before)
    })
  }

  for (const r of routeTable.filter((r) => isStateChanging(r) && r.access !== 'public' && !r.id)) {
    it(`${label(r)} takes a token's request from a foreign Origin with no CSRF header as far as its body check`, async () => {
      const before = snapshotBesideTokens()
      const method = r.method.toLowerCase() as 'post' | 'patch' | 'delete'
      // An unknown field (or, for the upload, no file): refused at the body, after the cross-site check.
      const res = await request(ctx.app)
        [method](pathOf(r))
        .set('authorization', `Bearer ${everyRole}`)
        .set('origin', 'https://elsewhere.example')
        .send(r.body === 'multipart' ? undefined : { ...r.validBody?.(world.ids), sweepUnknownField: true })
      // Minting is refused to every token (tests/api/apiTokens.test.ts): a signed-in member mints.
      const [status, code] =
        r.path === '/me/tokens'
          ? [403, 'forbidden']
          : r.body === 'multipart'
            ? [400, 'file_missing']
            : [400, 'invalid_input']
      expectErrorShape(res, status, code)
      expect(res.body.error.message).not.toMatch(/Cross-site/)
      expect(snapshotBesideTokens()).toEqual(before)
    })
  }
})

describe('unknown /api routes', () => {
  for (const method of ['get', 'post', 'put', 'patch', 'delete'] as const) {
    it(`${method.toUpperCase()} answers a JSON 404 naming the route`, async () => {
      const res = await demo.engineer[method]('/api/no-such-thing/42')
      expectErrorShape(res, 404, 'not_found')
      expect(res.body.error.message).toContain(`${method.toUpperCase()} /api/no-such-thing/42`)
    })
  }

  it('answers a JSON 404, not the app page, for a wrong method on a known path', async () => {
    expectErrorShape(await demo.engineer.put('/api/records'), 404, 'not_found')
  })
})

describe('sign-in with an unknown e-mail', () => {
  // Timing is not asserted (speed belongs in benchmarks); what makes both paths equally slow is
  // that the unknown address is checked against a hash of the same bcrypt cost as a member's.
  it('is checked against a hash of the same bcrypt cost as the members’ passwords', async () => {
    const member = ctx.db
      .select({ hash: users.passwordHash })
      .from(users)
      .where(eq(users.email, 'engineer@ordinate.test'))
      .get()!
    expect(bcrypt.getRounds(member.hash)).toBe(BCRYPT_COST)
    expect(bcrypt.getRounds(await dummyPasswordHash())).toBe(BCRYPT_COST)
  })

  it('answers 401 with the same message as a wrong password', async () => {
    const unknown = await ctx
      .anonymous()
      .post('/api/auth/sign-in')
      .send({ email: 'nobody-here@ordinate.test', password: 'some-password' })
    const wrong = await ctx
      .anonymous()
      .post('/api/auth/sign-in')
      .send({ email: 'engineer@ordinate.test', password: 'some-password' })
    expectErrorShape(unknown, 401, 'unauthorized')
    expect(unknown.body).toEqual(wrong.body)
  })
})
