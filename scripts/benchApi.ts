/**
 * `npm run bench:api`: the run API end to end, on the built server (node dist-server/server/index.js)
 * with the compiled worker, a fresh database and the demo data.
 *
 * 1. Latency: POST /api/runs → succeeded (seen on the run's event stream) for the standard job of the
 *    engine (the 8,001-point synthetic far-field demo record at Δt = 0.005 s, the default grid,
 *    damping 0.02, 0.05, 0.10, 0.20), one run at a time; median over RUNS_LATENCY runs after warm-up,
 *    for piecewise-exact (target ≤ 100 ms) and the default method (target ≤ 200 ms). Each run's
 *    answer says over how many threads it was computed (`timings.parts`), so the output states
 *    whether the runs were split over the idle threads, and how evenly (engine time per part).
 * 2. Throughput: 50 runs of the same job posted at once, with WORKER_THREADS=1 against the full pool
 *    (the available cores), as a ratio.
 *
 * Prints the figures; asserts nothing (speed belongs here, not in tests).
 */
import { once } from 'node:events'
import { availableParallelism, loadavg } from 'node:os'
import path from 'node:path'
import { pathToFileURL } from 'node:url'
import { Worker } from 'node:worker_threads'
import { repoRoot } from '../tests/e2e/harness.js'
import { startBenchServer } from '../tests/support/benchServer.js'
import { finalRunStatus } from '../tests/support/serverEvents.js'

const RUNS_LATENCY = Number(process.env.BENCH_RUNS ?? 21)
const WARM_UP = 2
const BURST = Number(process.env.BENCH_BURST ?? 50)
const STANDARD_JOB = { dampingRatios: [0.02, 0.05, 0.1, 0.2] }
type Method = 'piecewise-exact' | 'newmark-average'
const CLIENT = { 'x-ordinate-client': '1' }

interface Session {
  base: string
  cookie: string
  recordId: string
}

async function signIn(base: string): Promise<Session> {
  const res = await fetch(`${base}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', ...CLIENT },
    body: JSON.stringify({ email: 'engineer@ordinate.test', password: 'ordinate-demo' }),
  })
  if (!res.ok) throw new Error(`sign-in failed: ${res.status}`)
  const cookie = res.headers.get('set-cookie')?.split(';')[0] ?? ''
  const records = (await (await fetch(`${base}/api/records`, { headers: { cookie } })).json()) as {
    items: { id: string; points: number; dtS: number }[]
  }
  const standard = records.items.find((r) => r.points === 8001 && r.dtS === 0.005)
  if (!standard) throw new Error('the 8,001-point demo record is not in the demo data')
  return { base, cookie, recordId: standard.id }
}

async function postRun(s: Session, method: Method = 'newmark-average'): Promise<string> {
  const res = await fetch(`${s.base}/api/runs`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', cookie: s.cookie, ...CLIENT },
    body: JSON.stringify({ recordId: s.recordId, ...STANDARD_JOB, method }),
  })
  const body = (await res.json()) as { id?: string; error?: { message: string } }
  if (res.status !== 202 || !body.id)
    throw new Error(`POST /api/runs answered ${res.status}: ${body.error?.message}`)
  return body.id
}

/** Reads the run's event stream until its final status. */
const untilFinished = (s: Session, runId: string) => finalRunStatus(s.base, runId, s.cookie)

async function withServer<T>(workerThreads: number | undefined, fn: (s: Session) => Promise<T>): Promise<T> {
  const bench = await startBenchServer(
    workerThreads === undefined ? {} : { WORKER_THREADS: String(workerThreads) },
  )
  try {
    const session = await signIn(bench.server.url)
    // Enough credits for the whole bench: one grant row in the firm's ledger.
    bench.grantCredits(session.recordId, 1000)
    return await fn(session)
  } finally {
    await bench.stop()
  }
}

const median = (values: number[]) => {
  const sorted = [...values].sort((a, b) => a - b)
  const mid = Math.floor(sorted.length / 2)
  return sorted.length % 2 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2
}
const ms = (v: number) => `${v.toFixed(0)} ms`

/** The worker's own computing time of a run (its longest part), and how many parts it had. */
async function timingsOf(s: Session, runId: string): Promise<{ computeMs: number; parts: number }> {
  const run = (await (
    await fetch(`${s.base}/api/runs/${runId}`, { headers: { cookie: s.cookie } })
  ).json()) as {
    timings: { computeMs: number; parts?: number }
  }
  return { computeMs: run.timings.computeMs, parts: run.timings.parts ?? 1 }
}
const computeMs = async (s: Session, runId: string) => (await timingsOf(s, runId)).computeMs

interface Latency {
  wall: number[]
  engine: number[]
  parts: number[]
}

/** Wall time POST → succeeded, how much of it the engine took inside the worker, and the parts. */
async function latency(s: Session, method: Method): Promise<Latency> {
  const result: Latency = { wall: [], engine: [], parts: [] }
  for (let i = 0; i < WARM_UP + RUNS_LATENCY; i++) {
    const t0 = performance.now()
    const id = await postRun(s, method)
    const status = await untilFinished(s, id)
    const elapsed = performance.now() - t0
    if (status !== 'succeeded') throw new Error(`run ${id} ${status}`)
    if (i < WARM_UP) continue
    const timings = await timingsOf(s, id)
    result.wall.push(elapsed)
    result.engine.push(timings.computeMs)
    result.parts.push(timings.parts)
  }
  return result
}

function printLatency(method: Method, targetMs: number, r: Latency) {
  const overhead = r.wall.map((w, i) => w - r.engine[i]!)
  const split = r.parts.filter((p) => p > 1).length
  console.log(
    `${method}: POST → succeeded, one run at a time, ${r.wall.length} runs after ${WARM_UP} warm-up:`,
  )
  console.log(
    `  median ${ms(median(r.wall))}   min ${ms(Math.min(...r.wall))}   max ${ms(Math.max(...r.wall))}   (target ≤ ${targetMs} ms)`,
  )
  console.log(
    `  engine in the worker (a split run's longest part): median ${ms(median(r.engine))}; the rest (HTTP, queue,`,
  )
  console.log(`  messages, storing the spectrum, event stream): median ${ms(median(overhead))}`)
  console.log(
    `  split over idle threads: ${split} of ${r.parts.length} runs (parts per run: ${[...new Set(r.parts)].join(', ')})\n`,
  )
}

/**
 * Wall time from the first POST to the last run's end, and the median engine time per run: when
 * that grows with more threads, the cores were not free (other processes), not the queue.
 */
async function burst(s: Session): Promise<{ wallMs: number; engineMs: number }> {
  // Warm the threads first, so both measurements start from running workers.
  await untilFinished(s, await postRun(s))
  const t0 = performance.now()
  const ids = await Promise.all(Array.from({ length: BURST }, () => postRun(s)))
  const statuses = await Promise.all(ids.map((id) => untilFinished(s, id)))
  const wallMs = performance.now() - t0
  const failed = statuses.filter((st) => st !== 'succeeded').length
  if (failed) throw new Error(`${failed} of ${BURST} runs failed`)
  const engine = await Promise.all(ids.map((id) => computeMs(s, id)))
  return { wallMs, engineMs: median(engine) }
}

const CONTROL_JOBS = 8

/**
 * The control: the same engine job in bare worker threads (no server, queue or database), one
 * thread doing all the jobs against the pool's thread count sharing them. It shows what the
 * cores allow at this moment, which the queue cannot beat.
 */
async function bareThreads(threads: number): Promise<number> {
  const engineUrl = (file: string) =>
    pathToFileURL(path.join(repoRoot, 'dist-server/shared/spectra', file)).href
  const code = `
    const { parentPort, workerData } = require('node:worker_threads')
    Promise.all([import(${JSON.stringify(engineUrl('computeSpectrum.js'))}), import(${JSON.stringify(engineUrl('demo/demoRecords.js'))}),
                 import(${JSON.stringify(engineUrl('parseRecord.js'))}), import(${JSON.stringify(engineUrl('periods.js'))})])
      .then(([{ computeSpectrum }, { demoRecord }, { parseRecord }, { defaultPeriodsS }]) => {
        const r = parseRecord(demoRecord('synthetic-far-field').text)
        parentPort.postMessage('ready')
        parentPort.once('message', () => {
          for (let i = 0; i < workerData.jobs; i++)
            computeSpectrum({ accelMPerS2: r.accelMPerS2, dtS: r.dtS }, { dampingRatios: [0.02, 0.05, 0.1, 0.2], periodsS: defaultPeriodsS(), method: 'newmark-average' })
          parentPort.postMessage('done')
        })
      })`
  const workers = Array.from(
    { length: threads },
    () => new Worker(code, { eval: true, workerData: { jobs: CONTROL_JOBS / threads } }),
  )
  await Promise.all(workers.map((w) => once(w, 'message')))
  const t0 = performance.now()
  for (const w of workers) w.postMessage('go')
  await Promise.all(workers.map((w) => once(w, 'message')))
  const elapsed = performance.now() - t0
  await Promise.all(workers.map((w) => w.terminate()))
  return elapsed
}

async function main() {
  const cores = availableParallelism()
  console.log(`Run API benchmark: compiled server, ${cores} available core(s), Node ${process.version}`)
  console.log(
    `Standard job: 8,001-point demo record at Δt = 0.005 s, 301 default periods, damping 0.02/0.05/0.10/0.20\n`,
  )

  await withServer(undefined, async (s) => {
    printLatency('piecewise-exact', 100, await latency(s, 'piecewise-exact'))
    printLatency('newmark-average', 200, await latency(s, 'newmark-average'))
  })

  const single = await withServer(1, burst)
  const pooled = await withServer(undefined, burst)
  const line = (label: string, r: { wallMs: number; engineMs: number }) =>
    console.log(
      `  ${label} ${ms(r.wallMs)}  (${((BURST * 1000) / r.wallMs).toFixed(2)} runs/s; engine per run, median ${ms(r.engineMs)})`,
    )
  console.log(`${BURST} runs posted at once:`)
  line('1 worker thread: ', single)
  line(`${cores} worker threads:`, pooled)
  console.log(
    `  speed-up ${(single.wallMs / pooled.wallMs).toFixed(2)}×  (burst runs are never split: others wait)`,
  )
  const bareOne = await bareThreads(1)
  const barePool = await bareThreads(cores)
  console.log(
    `  control, bare threads without the server: ${CONTROL_JOBS} jobs on 1 thread ${ms(bareOne)}, on ${cores} ${ms(barePool)}: ${(bareOne / barePool).toFixed(2)}×`,
  )
  console.log(
    `  load average now: ${loadavg()
      .map((l) => l.toFixed(2))
      .join(', ')} (other processes share the cores)`,
  )
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : err)
  process.exit(1)
})
