import { mkdtemp, rm } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { afterAll, describe, expect, it, vi } from 'vitest'
import { openDb } from '../../server/db/client.js'
import { signInHttp } from '../support/httpApi.js'
import { type RunningServer, startServer } from './harness.js'

/**
 * The server process killed outright (SIGKILL: no shutdown code runs) while one run is computing
 * and others wait, then started again on the same database: every run finishes exactly once, and
 * each credit is spent exactly once. Drives the built server (`npm run build`) over HTTP.
 */
const RUNS = 4
const DEMO_CREDITS = 25

let dataDir: string
const servers: RunningServer[] = []

afterAll(async () => {
  for (const s of servers) await s.stop()
  if (dataDir) await rm(dataDir, { recursive: true, force: true })
})

/** The parts of API answers this test reads. */
interface ApiBody {
  id: string
  status: string
  progress: number
  items: { id: string; status: string }[]
}

function processGone(pid: number): boolean {
  try {
    process.kill(pid, 0)
    return false
  } catch {
    return true
  }
}

describe('the server killed with runs queued and running, then restarted', () => {
  it('finishes every run exactly once and spends each credit exactly once', async () => {
    dataDir = await mkdtemp(path.join(tmpdir(), 'ordinate-kill-'))
    const env = {
      DATA_DIR: dataDir,
      DATABASE_PATH: path.join(dataDir, 'ordinate.sqlite'),
      WORKER_THREADS: '1',
    }
    const first = await startServer(env)
    servers.push(first)
    const api = await signInHttp<ApiBody>(first.url, 'engineer@ordinate.test')

    // A synthetic 30 s record at 200 Hz, and a sweep long enough to be caught mid-run.
    const samples = Array.from({ length: 6000 }, (_, i) =>
      (0.1 * Math.sin(i / 9) * Math.sin(i / 1900)).toFixed(6),
    )
    const form = new FormData()
    form.set('name', 'Synthetic kill-test motion')
    form.set('units', 'g')
    form.set('dtS', '0.005')
    form.set('file', new Blob([samples.join('\n')]), 'kill-test.txt')
    const record = await api('POST', '/records', form)
    expect(record.status).toBe(201)

    const settings = { dampingRatios: [0.02, 0.05, 0.1], periodGrid: { minS: 0.01, maxS: 10, count: 800 } }
    const ids: string[] = []
    for (let i = 0; i < RUNS; i++) {
      const run = await api('POST', '/runs', { recordId: record.body.id, ...settings })
      expect(run.status).toBe(202)
      ids.push(run.body.id)
    }
    await vi.waitFor(
      async () => {
        const run = await api('GET', `/runs/${ids[0]}`)
        expect(run.body.status).toBe('running')
        expect(run.body.progress).toBeGreaterThan(0)
      },
      { timeout: 30_000, interval: 20 },
    )
    const before = await api('GET', '/runs')
    const statuses = before.body.items.map((r) => r.status)
    expect(statuses.filter((s) => s === 'queued').length).toBeGreaterThan(0)

    process.kill(-first.pid, 'SIGKILL')
    await vi.waitFor(() => expect(processGone(first.pid)).toBe(true), { timeout: 10_000 })

    const second = await startServer(env)
    servers.push(second)
    expect(second.output()).toMatch(/interrupted run\(s\) queued again/)
    const again = await signInHttp<ApiBody>(second.url, 'engineer@ordinate.test')
    await vi.waitFor(
      async () => {
        const list = await again('GET', '/runs')
        const mine = list.body.items.filter((r) => ids.includes(r.id))
        expect(mine.map((r) => r.status)).toEqual(new Array(RUNS).fill('succeeded'))
      },
      { timeout: 120_000, interval: 200 },
    )
    for (const id of ids) expect((await again('GET', `/runs/${id}/spectrum`)).status).toBe(200)
    await second.stop()
    servers.pop()

    const db = openDb(env.DATABASE_PATH)
    try {
      const perRun = (sql: string, id: string) => db.$client.prepare(sql).all(id) as Record<string, unknown>[]
      for (const id of ids) {
        expect(perRun('SELECT run_id FROM spectra WHERE run_id = ?', id)).toHaveLength(1)
        expect(
          perRun("SELECT id FROM audit_log WHERE action = 'run.succeeded' AND subject_id = ?", id),
        ).toHaveLength(1)
        expect(perRun('SELECT kind, delta FROM credit_ledger WHERE run_id = ? ORDER BY id', id)).toEqual([
          { kind: 'run_reserved', delta: -1 },
        ])
      }
      const { balance } = db.$client
        .prepare(
          'SELECT SUM(delta) AS balance FROM credit_ledger WHERE firm_id = (SELECT firm_id FROM runs WHERE id = ?)',
        )
        .get(ids[0]) as { balance: number }
      expect(balance).toBe(DEMO_CREDITS - RUNS)
    } finally {
      db.$client.close()
    }
  }, 240_000)
})
