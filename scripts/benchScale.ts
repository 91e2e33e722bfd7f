/**
 * `npm run bench:scale`: throughput of a burst of runs (BENCH_BURST, default 50, of the standard
 * job: the 8,001-point demo record, the default grid, damping 2/5/10/20%) posted at once to the
 * built server, timed from the first POST until every run has succeeded:
 * 1. the embedded queue (the web process's own threads, WORKER_THREADS = the cores);
 * 2. BullMQ on a loopback redis-server, the web process computing nothing (WORKER_THREADS=0),
 *    with one compute node (`npm run worker`, WORKER_THREADS=1);
 * 3. the same with two compute nodes.
 * Figures are reported as runs per second and as ratios to the embedded queue in the same run;
 * there is no target on a 2-core machine, where two nodes compete with the web process.
 */
import { availableParallelism, loadavg } from 'node:os'
import { startBenchServer } from '../tests/support/benchServer.js'
import { startComputeNode, type RunningComputeNode } from '../tests/support/computeNode.js'
import { signInHttp } from '../tests/support/httpApi.js'
import { startRedisServer, type RedisServer } from '../tests/support/redisServer.js'

const BURST = Number(process.env.BENCH_BURST ?? 50)
const STANDARD_JOB = { dampingRatios: [0.02, 0.05, 0.1, 0.2] }

interface Body {
  id: string
  items: { id: string; status: string; points: number; dtS: number }[]
}

/** Posts the burst to a server on a fresh database and answers the seconds until all succeeded. */
async function burst(env: Record<string, string>): Promise<number> {
  const bench = await startBenchServer(env)
  try {
    const api = await signInHttp<Body>(bench.server.url, 'engineer@ordinate.test')
    const standard = (await api('GET', '/records')).body.items.find(
      (r) => r.points === 8001 && r.dtS === 0.005,
    )
    if (!standard) throw new Error('the 8,001-point demo record is not in the demo data')
    bench.grantCredits(standard.id, BURST)
    const t0 = performance.now()
    const posted = await Promise.all(
      Array.from({ length: BURST }, () => api('POST', '/runs', { recordId: standard.id, ...STANDARD_JOB })),
    )
    const ids = new Set(posted.map((p) => p.body.id))
    for (;;) {
      const runs = (await api('GET', '/runs')).body.items.filter((r) => ids.has(r.id))
      const failed = runs.find((r) => r.status === 'failed')
      if (failed) throw new Error(`run ${failed.id} failed`)
      if (runs.length === ids.size && runs.every((r) => r.status === 'succeeded')) break
      await new Promise((resolve) => setTimeout(resolve, 50))
    }
    return (performance.now() - t0) / 1000
  } finally {
    await bench.stop()
  }
}

async function throughRedis(redis: RedisServer, nodeCount: number): Promise<number> {
  const nodes: RunningComputeNode[] = []
  try {
    for (let i = 0; i < nodeCount; i++)
      nodes.push(await startComputeNode({ REDIS_URL: redis.url, WORKER_THREADS: '1' }))
    return await burst({ REDIS_URL: redis.url, WORKER_THREADS: '0' })
  } finally {
    for (const node of nodes) await node.stop()
  }
}

async function main() {
  console.log(
    `bench:scale — ${BURST} standard-job runs posted at once; ${availableParallelism()} cores, load average ${loadavg()[0]!.toFixed(2)}`,
  )
  const embedded = await burst({})
  const redis = await startRedisServer()
  try {
    const one = await throughRedis(redis, 1)
    const two = await throughRedis(redis, 2)
    const rate = (s: number) => `${(BURST / s).toFixed(2)} runs/s (${s.toFixed(2)} s)`
    console.log(`embedded queue, ${availableParallelism()} threads: ${rate(embedded)}`)
    console.log(
      `Redis, 1 compute node × 1 thread:  ${rate(one)}, ${(embedded / one).toFixed(2)}× the embedded throughput`,
    )
    console.log(
      `Redis, 2 compute nodes × 1 thread: ${rate(two)}, ${(embedded / two).toFixed(2)}× the embedded throughput, ${(one / two).toFixed(2)}× one node`,
    )
    console.log(`load average after: ${loadavg()[0]!.toFixed(2)}`)
  } finally {
    await redis.dispose()
  }
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.stack : err)
  process.exit(1)
})
