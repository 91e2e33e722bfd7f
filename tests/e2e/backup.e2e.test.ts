import { spawn } from 'node:child_process'
import { randomUUID } from 'node:crypto'
import { readdirSync } from 'node:fs'
import { mkdtemp, rm } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { afterAll, describe, expect, it, vi } from 'vitest'
import { signInHttp } from '../support/httpApi.js'
import { ledgerProblems } from '../support/ledgerAudit.js'
import { repoRoot, startServer, type RunningServer } from './harness.js'

/**
 * `npm run backup` while the built server is busy with a burst of runs and purchases, then the
 * backup restored into a fresh server: the ledger balances and every finished run's spectrum
 * reads back. The backup script is started with node directly (not npm), as README says it runs.
 */
interface Body {
  id: string
  status: string
  balance: number
  items: { id: string; status: string; credits?: number }[]
}

const dirs: string[] = []
const servers: RunningServer[] = []

afterAll(async () => {
  for (const s of servers) await s.stop()
  for (const d of dirs) await rm(d, { recursive: true, force: true })
})

function runScript(
  args: string[],
  env: Record<string, string>,
): Promise<{ code: number | null; output: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ['--import', 'tsx', 'scripts/backup.ts', ...args], {
      cwd: repoRoot,
      env: { PATH: process.env.PATH ?? '/usr/bin:/bin', NODE_ENV: 'test', ...env },
      stdio: ['ignore', 'pipe', 'pipe'],
    })
    let output = ''
    child.stdout.on('data', (c: Buffer) => (output += c.toString()))
    child.stderr.on('data', (c: Buffer) => (output += c.toString()))
    child.once('exit', (code) => resolve({ code, output }))
  })
}

async function settled(api: Awaited<ReturnType<typeof signInHttp<Body>>>) {
  await vi.waitFor(
    async () => {
      const list = await api('GET', '/runs')
      expect(list.body.items.filter((r) => r.status === 'queued' || r.status === 'running')).toEqual([])
    },
    { timeout: 120_000, interval: 250 },
  )
}

describe('npm run backup during a burst, restored into a fresh server', () => {
  it('keeps a balanced ledger and readable spectra', async () => {
    const liveDir = await mkdtemp(path.join(tmpdir(), 'ordinate-backup-live-'))
    const freshDir = await mkdtemp(path.join(tmpdir(), 'ordinate-backup-fresh-'))
    dirs.push(liveDir, freshDir)
    const live = {
      DATA_DIR: liveDir,
      DATABASE_PATH: path.join(liveDir, 'ordinate.sqlite'),
      WORKER_THREADS: '1',
    }
    const fresh = {
      DATA_DIR: freshDir,
      DATABASE_PATH: path.join(freshDir, 'ordinate.sqlite'),
      WORKER_THREADS: '1',
    }
    const backupFile = path.join(liveDir, 'backups', 'copy.sqlite')

    const server = await startServer(live)
    servers.push(server)
    const engineer = await signInHttp<Body>(server.url, 'engineer@ordinate.test')
    const admin = await signInHttp<Body>(server.url, 'admin@ordinate.test')
    const record = (await engineer('GET', '/records')).body.items[0]
    const pack = (await admin('GET', '/credits/packs')).body.items[0]
    expect(record && pack).toBeTruthy()

    // The burst: runs and purchases in flight together, and the backup started in the middle.
    const settings = { dampingRatios: [0.05], periodGrid: { minS: 0.05, maxS: 5, count: 60 } }
    const burst: Promise<unknown>[] = []
    for (let i = 0; i < 6; i++) {
      burst.push(engineer('POST', '/runs', { recordId: record!.id, ...settings }))
      burst.push(
        admin('POST', '/credits/purchases', {
          packId: pack!.id,
          cardToken: 'tok_visa',
          purchaseId: randomUUID(),
        }),
      )
    }
    const backup = runScript([backupFile], live)
    for (let i = 0; i < 6; i++) burst.push(engineer('POST', '/runs', { recordId: record!.id, ...settings }))
    await Promise.all(burst)
    const done = await backup
    expect(done.output).toMatch(/Backed up .* original file\(s\) copied/)
    expect(done.code).toBe(0)
    await settled(engineer)
    await server.stop()
    servers.pop()
    expect(ledgerProblems(live.DATABASE_PATH)).toEqual([])

    const restored = await runScript(['--restore', backupFile], fresh)
    expect(restored.code, restored.output).toBe(0)
    expect(ledgerProblems(fresh.DATABASE_PATH)).toEqual([])

    const second = await startServer(fresh)
    servers.push(second)
    const again = await signInHttp<Body>(second.url, 'engineer@ordinate.test')
    await settled(again)
    const runs = (await again('GET', '/runs')).body.items
    expect(runs.length).toBeGreaterThan(0)
    for (const run of runs.filter((r) => r.status === 'succeeded'))
      expect((await again('GET', `/runs/${run.id}/spectrum`)).status).toBe(200)
    const credits = await again('GET', '/credits')
    const sum = (credits.body as unknown as { entries: { delta: number }[] }).entries.reduce(
      (s, e) => s + e.delta,
      0,
    )
    expect(credits.body.balance).toBe(sum)
    // Every original record file came along with the database.
    expect(readdirSync(path.join(freshDir, 'originals')).sort()).toEqual(
      readdirSync(path.join(liveDir, 'originals')).sort(),
    )
    await second.stop()
    servers.pop()
    expect(ledgerProblems(fresh.DATABASE_PATH)).toEqual([])
  })
})
