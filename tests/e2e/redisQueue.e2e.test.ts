import { mkdtemp, rm } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest'
import { startComputeNode, type RunningComputeNode } from '../support/computeNode.js'
import { signInHttp, type HttpApi } from '../support/httpApi.js'
import { ledgerProblems } from '../support/ledgerAudit.js'
import { startRedisServer, type RedisServer } from '../support/redisServer.js'
import { startServer, type RunningServer } from './harness.js'

/**
 * The distributed run queue against a real redis-server on a loopback port (persistence off),
 * the built web server and compute nodes started with node itself (`npm run worker` runs the
 * same file). Short BullMQ locks (QUEUE_LOCK_MS, QUEUE_STALLED_MS) so a killed node's run is
 * noticed in seconds, though not so short that a node starved of CPU on a loaded 2-core machine
 * misses its lock renewals (2 s was seen to lose a run's three attempts in CI). After each scenario the SQLite ledger is audited: one reservation per
 * run, a return for each failed run only, one spectrum for each succeeded run only.
 */
interface Body {
  id: string
  status: string
  balance: number
  items: { id: string; status: string }[]
  periodsS: number[]
  curves: unknown[]
  methodStatement: unknown
  warnings: string[]
  error: { code: string }
  ok: boolean
  queue: string
  redisReachable: boolean
  workers: number
}

const DEMO_CREDITS = 25
const SETTINGS = { dampingRatios: [0.05], periodGrid: { minS: 0.05, maxS: 5, count: 30 } }
/** Each scenario waits for real processes and a real Redis; generous on a shared 2-core machine. */
const SCENARIO_TIMEOUT_MS = 240_000

let redis: RedisServer
const servers: RunningServer[] = []
const nodes: RunningComputeNode[] = []
const dirs: string[] = []

beforeAll(async () => {
  redis = await startRedisServer()
})

afterEach(async () => {
  for (const node of nodes.splice(0)) await node.kill()
  for (const server of servers.splice(0)) await server.stop()
  // Each scenario starts from an empty queue.
  const { Redis } = await import('ioredis')
  const client = new Redis(redis.url, { maxRetriesPerRequest: 1 })
  await client.flushall().catch(() => {})
  client.disconnect()
})

afterAll(async () => {
  await redis?.dispose()
  for (const dir of dirs) await rm(dir, { recursive: true, force: true })
})

/** A web server's environment on a fresh data folder: Redis with no local threads, or the embedded queue. */
const QUEUE_TIMING = { QUEUE_LOCK_MS: '8000', QUEUE_STALLED_MS: '2000' }

async function webEnv(queue: 'redis' | 'embedded' = 'redis') {
  const dir = await mkdtemp(path.join(tmpdir(), 'ordinate-redis-web-'))
  dirs.push(dir)
  const base = { DATA_DIR: dir, DATABASE_PATH: path.join(dir, 'ordinate.sqlite') }
  if (queue === 'embedded') return { ...base, WORKER_THREADS: '1' }
  return {
    ...base,
    REDIS_URL: redis.url,
    WORKER_THREADS: '0',
    ...QUEUE_TIMING,
  }
}

async function web(env: Record<string, string>) {
  const server = await startServer(env)
  servers.push(server)
  return server
}

async function computeNode() {
  const node = await startComputeNode({
    REDIS_URL: redis.url,
    WORKER_THREADS: '1',
    ...QUEUE_TIMING,
  })
  nodes.push(node)
  return node
}

async function demoRecordId(api: HttpApi<Body>): Promise<string> {
  const record = (await api('GET', '/records')).body.items[0]
  if (!record) throw new Error('no demo record')
  return record.id
}

async function postRuns(api: HttpApi<Body>, recordId: string, count: number) {
  const answers = await Promise.all(
    Array.from({ length: count }, () => api('POST', '/runs', { recordId, ...SETTINGS })),
  )
  return answers
}

async function allSucceeded(api: HttpApi<Body>, ids: string[], timeout = 180_000) {
  await vi.waitFor(
    async () => {
      const list = (await api('GET', '/runs')).body.items.filter((r) => ids.includes(r.id))
      const failed = list.filter((r) => r.status === 'failed')
      expect(failed.map((r) => `${r.id}: ${String((r as { error?: unknown }).error)}`)).toEqual([])
      expect(list.map((r) => r.status)).toEqual(ids.map(() => 'succeeded'))
    },
    { timeout, interval: 250 },
  )
}

/** Waits until the queue is under way: at least one run has succeeded (others still wait). */
async function firstSucceeded(api: HttpApi<Body>) {
  await vi.waitFor(
    async () => {
      const list = (await api('GET', '/runs')).body.items
      expect(list.filter((r) => r.status === 'succeeded').length).toBeGreaterThan(0)
    },
    { timeout: 30_000, interval: 100 },
  )
}

/** Stops the web server (its SQLite file stays) and audits the ledger. */
async function auditAfterStop(server: RunningServer, databasePath: string) {
  await server.stop()
  servers.splice(servers.indexOf(server), 1)
  expect(ledgerProblems(databasePath)).toEqual([])
}

describe('runs through BullMQ on Redis', () => {
  it(
    'accepts exactly 25 of 30 runs posted at once with 25 credits, and computes them bit for bit as the embedded queue does',
    async () => {
      const env = await webEnv()
      const server = await web(env)
      const api = await signInHttp<Body>(server.url, 'engineer@ordinate.test')
      const health = await fetch(`${server.url}/api/health`).then((r) => r.json() as Promise<Body>)
      expect(health).toMatchObject({ ok: true, queue: 'redis', redisReachable: true, workers: 0 })

      const recordId = await demoRecordId(api)
      const answers = await postRuns(api, recordId, 30)
      expect(answers.filter((a) => a.status === 202)).toHaveLength(DEMO_CREDITS)
      expect(answers.filter((a) => a.status === 402).map((a) => a.body.error.code)).toEqual(
        new Array(30 - DEMO_CREDITS).fill('no_credits'),
      )
      const ids = answers.filter((a) => a.status === 202).map((a) => a.body.id)

      await computeNode()
      await vi.waitFor(
        async () =>
          expect((await fetch(`${server.url}/api/health`).then((r) => r.json())) as Body).toMatchObject({
            workers: 1,
          }),
        { timeout: 10_000, interval: 200 },
      )
      await allSucceeded(api, ids)
      const viaRedis = (await api('GET', `/runs/${ids[0]}/spectrum`)).body

      // The same run on the embedded queue.
      const embedded = await web(await webEnv('embedded'))
      const local = await signInHttp<Body>(embedded.url, 'engineer@ordinate.test')
      const [run] = await postRuns(local, await demoRecordId(local), 1)
      await allSucceeded(local, [run!.body.id])
      const viaThreads = (await local('GET', `/runs/${run!.body.id}/spectrum`)).body
      const essence = (b: Body) => JSON.stringify([b.periodsS, b.curves, b.methodStatement, b.warnings])
      expect(essence(viaRedis)).toBe(essence(viaThreads))

      await auditAfterStop(server, env.DATABASE_PATH)
    },
    SCENARIO_TIMEOUT_MS,
  )

  it(
    'finishes every run once when one of two compute nodes is killed mid-queue',
    async () => {
      const env = await webEnv()
      const server = await web(env)
      const api = await signInHttp<Body>(server.url, 'engineer@ordinate.test')
      const victim = await computeNode()
      await computeNode()
      const answers = await postRuns(api, await demoRecordId(api), 12)
      const ids = answers.map((a) => a.body.id)
      expect(answers.every((a) => a.status === 202)).toBe(true)
      await firstSucceeded(api)
      await victim.kill()
      await allSucceeded(api, ids)
      const credits = (await api('GET', '/credits')).body
      expect(credits.balance).toBe(DEMO_CREDITS - ids.length)
      await auditAfterStop(server, env.DATABASE_PATH)
    },
    SCENARIO_TIMEOUT_MS,
  )

  it(
    'loses and doubles nothing when Redis stops while runs are posted, then comes back',
    async () => {
      const env = await webEnv()
      const server = await web(env)
      const api = await signInHttp<Body>(server.url, 'engineer@ordinate.test')
      const recordId = await demoRecordId(api)
      await computeNode()
      const before = await postRuns(api, recordId, 3)
      await redis.stop()
      const during = await postRuns(api, recordId, 4)
      expect([...before, ...during].every((a) => a.status === 202)).toBe(true)
      const down = (await fetch(`${server.url}/api/health`).then((r) => r.json())) as Body
      expect(down).toMatchObject({ ok: true, queue: 'redis', redisReachable: false })
      await redis.start()
      const ids = [...before, ...during].map((a) => a.body.id)
      await allSucceeded(api, ids)
      await auditAfterStop(server, env.DATABASE_PATH)
    },
    SCENARIO_TIMEOUT_MS,
  )

  it(
    'finishes every run once when the web process is killed mid-queue and started again',
    async () => {
      const env = await webEnv()
      const first = await web(env)
      const api = await signInHttp<Body>(first.url, 'engineer@ordinate.test')
      await computeNode()
      const answers = await postRuns(api, await demoRecordId(api), 10)
      const ids = answers.map((a) => a.body.id)
      await firstSucceeded(api)
      process.kill(-first.pid, 'SIGKILL')
      await first.stop()
      servers.splice(servers.indexOf(first), 1)
      const second = await web(env)
      const again = await signInHttp<Body>(second.url, 'engineer@ordinate.test')
      await allSucceeded(again, ids)
      await auditAfterStop(second, env.DATABASE_PATH)
    },
    SCENARIO_TIMEOUT_MS,
  )
})
