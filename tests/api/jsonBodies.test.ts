import { readFileSync, readdirSync } from 'node:fs'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import type request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { snapshotDb } from '../support/dbSnapshot.js'
import { createWorldContext, type DemoWorld, type WorldContext } from '../support/demoWorld.js'
import { type RouteSpec, fillPath, routeKey, routeTable } from '../support/routeTable.js'
import type { TestContext } from '../support/testApp.js'

/**
 * Hostile and careless bodies against every JSON route of the route table, and hostile query
 * strings and multipart fields: each refused with a 4xx in the one error shape, nothing written,
 * and Object.prototype left alone.
 */
let w: WorldContext
let ctx: TestContext
let world: DemoWorld
let agents: WorldContext['members']

beforeAll(async () => {
  w = await createWorldContext()
  ;({ ctx, world, members: agents } = w)
})
afterAll(() => w?.close())

/** A member allowed past the route's role check, so only the body can be refused. */
const agentFor = (r: RouteSpec) => w.agentFor(r)
const pathOf = (r: RouteSpec) =>
  fillPath(r, {
    id: r.id ? world.idOf[r.id] : undefined,
    token: r.token ? world.tokenOf[r.token] : undefined,
  })

function sendRaw(r: RouteSpec, raw: string) {
  const method = r.method.toLowerCase() as 'post' | 'patch'
  return agentFor(r)[method](pathOf(r)).set('content-type', 'application/json').send(raw)
}

/** A value of another JSON type than `value`. */
function wrongType(value: unknown): unknown {
  if (typeof value === 'string') return 12345
  if (typeof value === 'number') return 'twelve'
  if (typeof value === 'boolean') return 'yes'
  if (Array.isArray(value)) return 'not-a-list'
  return 7
}

function nested(depth: number): string {
  return '{"a":'.repeat(depth) + '1' + '}'.repeat(depth)
}

const polluted = () =>
  (Object.prototype as Record<string, unknown>).polluted ?? ({} as Record<string, unknown>).polluted

function expectRefused(res: request.Response, status = 400) {
  expect(res.status, `${res.status} ${JSON.stringify(res.body)}`).toBe(status)
  expect(res.type).toBe('application/json')
  expect(Object.keys(res.body)).toEqual(['error'])
  expect(typeof res.body.error.code).toBe('string')
  expect(res.body.error.message.length).toBeGreaterThan(5)
}

describe.each(routeTable.filter((r) => r.body === 'json').map((r) => [routeKey(r), r] as const))(
  '%s',
  (_name, r) => {
    const valid = () => r.validBody!(world.ids)
    const cases: { title: string; raw: () => string; status?: number; message?: () => RegExp }[] = [
      { title: 'a list instead of an object', raw: () => '[]' },
      { title: 'a bare JSON string', raw: () => '"text"' },
      { title: 'text that is not JSON', raw: () => '{"name": ', message: () => /not valid JSON/ },
      ...(r.emptyBodyValid ? [] : [{ title: 'an empty object (missing fields)', raw: () => '{}' }]),
      {
        title: 'an unknown field beside valid ones',
        raw: () => JSON.stringify({ ...valid(), surplusField: 1 }),
        message: () => /surplusField/,
      },
      ...Object.keys(r.validBody!(placeholderIds)).map((key) => ({
        title: `the wrong type for ${key}`,
        raw: () => JSON.stringify({ ...valid(), [key]: wrongType(valid()[key]) }),
        message: () => new RegExp(`^${key}\\b`),
      })),
      {
        title: 'a huge array (200,000 items)',
        raw: () => {
          const body = valid()
          const arrayKey = Object.keys(body).find((k) => Array.isArray(body[k])) ?? 'surplusList'
          return JSON.stringify({ ...body, [arrayKey]: new Array(200_000).fill(0) })
        },
      },
      {
        title: 'a body over the 2 MB limit',
        raw: () => JSON.stringify({ ...valid(), pad: 'x'.repeat(3 * 1024 * 1024) }),
        status: 413,
      },
      { title: 'nesting 5,000 objects deep', raw: () => nested(5000) },
      {
        title: 'nesting 5,000 objects deep inside a known field',
        // Spliced as text: the test's own JSON.stringify would run out of stack at this depth.
        raw: () => {
          const [first, ...rest] = Object.entries(valid())
          const tail = rest.map(([k, v]) => `,${JSON.stringify(k)}:${JSON.stringify(v)}`).join('')
          return `{${JSON.stringify(first![0])}:${nested(5000)}${tail}}`
        },
      },
      {
        title: 'a __proto__ key',
        raw: () => JSON.stringify(valid()).replace(/^\{/, '{"__proto__":{"polluted":"yes","isAdmin":true},'),
        message: () => /__proto__/,
      },
      {
        title: 'a constructor.prototype key',
        raw: () => JSON.stringify(valid()).replace(/^\{/, '{"constructor":{"prototype":{"polluted":"yes"}},'),
        message: () => /constructor/,
      },
    ]

    for (const c of cases) {
      it(`refuses ${c.title} with ${c.status ?? 400}, writes nothing and pollutes no prototype`, async () => {
        const before = snapshotDb(ctx.db)
        const res = await sendRaw(r, c.raw())
        expectRefused(res, c.status)
        if (c.message) expect(res.body.error.message).toMatch(c.message())
        expect(polluted()).toBeUndefined()
        expect(snapshotDb(ctx.db)).toEqual(before)
      })
    }
  },
)

/** Ids of the right shape, to list a valid body's keys before the world exists. */
const placeholderIds = {
  projectId: '00000000-0000-4000-8000-000000000000',
  recordIds: ['00000000-0000-4000-8000-000000000001', '00000000-0000-4000-8000-000000000002'] as [
    string,
    string,
  ],
  runId: '00000000-0000-4000-8000-000000000003',
  comparisonId: '00000000-0000-4000-8000-000000000004',
  reviewId: '00000000-0000-4000-8000-000000000005',
  membershipId: '00000000-0000-4000-8000-000000000006',
  invitationId: '00000000-0000-4000-8000-000000000007',
  targetId: '00000000-0000-4000-8000-000000000008',
}

describe('query strings', () => {
  for (const r of routeTable.filter((r) => r.query)) {
    const path = () => fillPath(r, { id: r.id ? world.idOf[r.id] : undefined })
    it(`${routeKey(r)} refuses an unknown parameter, naming it`, async () => {
      const res = await agentFor(r).get(path()).query({ surplus: '1' })
      expectRefused(res)
      expect(res.body.error.message).toMatch(/surplus/)
    })
    it(`${routeKey(r)} refuses __proto__ parameters without polluting the prototype`, async () => {
      const res = await agentFor(r).get(
        `${path()}?__proto__[polluted]=yes&constructor[prototype][polluted]=yes`,
      )
      expectRefused(res)
      expect(polluted()).toBeUndefined()
    })
  }

  it('refuses a repeated parameter where one value is expected', async () => {
    const res = await agents.engineer.get(
      `/api/records?projectId=${world.ids.projectId}&projectId=${world.ids.projectId}`,
    )
    expectRefused(res)
    expect(res.body.error.message).toMatch(/^projectId/)
  })
})

describe('POST /api/records multipart fields', () => {
  const file = () => Buffer.from('0\n0.01\n-0.01\n'.repeat(10))
  const cases: { title: string; fields: [string, string][]; message: RegExp }[] = [
    { title: 'an unknown field', fields: [['surplus', '1']], message: /surplus/ },
    { title: 'a __proto__ field', fields: [['__proto__[polluted]', 'yes']], message: /__proto__/ },
    {
      title: 'a constructor.prototype field',
      fields: [['constructor[prototype][polluted]', 'yes']],
      message: /constructor/,
    },
    {
      title: 'a field given twice',
      fields: [
        ['name', 'a'],
        ['name', 'b'],
      ],
      message: /^name/,
    },
    { title: 'a number field that is not a number', fields: [['dtS', 'fast']], message: /^dtS/ },
  ]
  for (const c of cases) {
    it(`refuses ${c.title} with 400, writes nothing and pollutes no prototype`, async () => {
      const before = snapshotDb(ctx.db)
      let req = agents.engineer.post('/api/records').field('units', 'g')
      for (const [k, v] of c.fields) req = req.field(k, v)
      const res = await req.attach('file', file(), 'x.txt')
      expectRefused(res)
      expect(res.body.error.message).toMatch(c.message)
      expect(polluted()).toBeUndefined()
      expect(snapshotDb(ctx.db)).toEqual(before)
    })
  }
})

describe('the route handlers', () => {
  // Choosing a schema by whether a key is present (as POST /runs does for pair runs) reads no value.
  const keyGuard =
    /typeof req\.(body|query|params) === 'object'|req\.(body|query|params) !== null|'\w+' in req\.(body|query|params)/g

  it('read body, query and params only through a zod schema', () => {
    const routesDir = path.join(path.dirname(fileURLToPath(import.meta.url)), '..', '..', 'server', 'routes')
    const unparsed: string[] = []
    let reads = 0
    for (const file of readdirSync(routesDir).filter((f) => f.endsWith('.ts'))) {
      readFileSync(path.join(routesDir, file), 'utf8')
        .split('\n')
        .forEach((fullLine, i) => {
          const line = fullLine.replace(keyGuard, '(guard)')
          for (const match of line.matchAll(/req\.(body|query|params)\b/g)) {
            reads++
            const parsed = new RegExp(`\\w+Schema\\.parse\\(req\\.${match[1]}( \\?\\? \\{\\})?\\)`).test(line)
            if (!parsed) unparsed.push(`${file}:${i + 1}: ${fullLine.trim()}`)
          }
        })
    }
    expect(reads).toBeGreaterThan(30)
    expect(unparsed).toEqual([])
  })
})
