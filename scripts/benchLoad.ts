/**
 * `npm run bench:load`: a bounded load test on loopback. Starts the built server
 * (node dist-server/server/index.js) on a fresh database with the demo data, adds LOAD_MEMBERS
 * engineers to the demo firm and tops up its credits by buying packs through the API (the
 * in-process payment mock), then for LOAD_DURATION_S seconds every member, concurrently, uploads
 * a synthetic record, runs it, waits for the run on its event stream and reads the results back.
 *
 * Reports p50/p95 of the reads and of run completion (POST /api/runs → succeeded). Exits non-zero
 * on any error answer, any failed run, or a credits ledger that does not balance at the end.
 * Not part of `npm test`: speed belongs in benchmarks.
 *
 *   LOAD_MEMBERS=20 LOAD_DURATION_S=60 npm run bench:load
 */
import { availableParallelism } from 'node:os'
import Database from 'better-sqlite3'
import { hashPassword } from '../server/services/auth.js'
import { newId } from '../server/ids.js'
import { startBenchServer } from '../tests/support/benchServer.js'
import { finalRunStatus } from '../tests/support/serverEvents.js'

const MEMBERS = Number(process.env.LOAD_MEMBERS ?? 20)
const DURATION_S = Number(process.env.LOAD_DURATION_S ?? 60)
/** Packs of 200 credits bought before the load starts. */
const PACKS = Number(process.env.LOAD_PACKS ?? 10)
const PASSWORD = 'load-test-password'
const CLIENT = { 'x-ordinate-client': '1' }

class Failure extends Error {}

/** One member's HTTP session: cookie, CSRF header, and the latencies it saw. */
class Member {
  private cookie = ''
  constructor(
    private readonly base: string,
    readonly email: string,
    private readonly stats: Stats,
  ) {}

  async signIn(password: string) {
    const res = await fetch(`${this.base}/api/auth/sign-in`, {
      method: 'POST',
      headers: { 'content-type': 'application/json', ...CLIENT },
      body: JSON.stringify({ email: this.email, password }),
    })
    if (res.status !== 200) throw new Failure(`sign-in of ${this.email} answered ${res.status}`)
    this.cookie = res.headers.get('set-cookie')?.split(';')[0] ?? ''
  }

  /** A request; anything but the expected status is an error. GETs count as reads. */
  async call<T>(method: string, route: string, expected: number, body?: unknown): Promise<T> {
    const headers: Record<string, string> = { cookie: this.cookie, ...CLIENT }
    let payload: BodyInit | undefined
    if (body instanceof FormData) payload = body
    else if (body !== undefined) {
      payload = JSON.stringify(body)
      headers['content-type'] = 'application/json'
    }
    const t0 = performance.now()
    const res = await fetch(`${this.base}/api${route}`, { method, headers, body: payload })
    const text = await res.text()
    const elapsed = performance.now() - t0
    if (method === 'GET') this.stats.reads.push(elapsed)
    if (res.status !== expected) {
      throw new Failure(
        `${this.email}: ${method} ${route} answered ${res.status} (expected ${expected}): ${text.slice(0, 200)}`,
      )
    }
    return (res.headers.get('content-type')?.includes('json') ? JSON.parse(text) : text) as T
  }

  /** Waits on the run's event stream for its final status. */
  finalStatus(runId: string): Promise<string> {
    return finalRunStatus(this.base, runId, this.cookie)
  }
}

interface Stats {
  reads: number[]
  runCompletions: number[]
  uploads: number
  runs: number
  errors: string[]
}

/** A synthetic record (labelled so in its header), different for every upload. */
function syntheticRecord(seed: number): Blob {
  const lines = ['# Synthetic load-test record (generated, not a recording)', `# upload ${seed}`]
  for (let i = 0; i < 1500; i++) {
    const t = i * 0.01
    const envelope = Math.sin((Math.PI * i) / 1499) ** 2
    lines.push(
      (
        envelope *
        (0.12 * Math.sin(2 * Math.PI * 1.1 * t + seed) + 0.05 * Math.sin(2 * Math.PI * 4.3 * t))
      ).toFixed(6),
    )
  }
  return new Blob([lines.join('\n')])
}

/** One member's loop until the deadline: upload, run, follow the run, read the results. */
async function work(member: Member, index: number, deadline: number, stats: Stats) {
  for (let n = 0; performance.now() < deadline; n++) {
    const form = new FormData()
    form.set('name', `Load ${index}-${n} (synthetic)`)
    form.set('units', 'g')
    form.set('dtS', '0.01')
    form.set('file', syntheticRecord(index * 100_000 + n), `load-${index}-${n}.txt`)
    const record = await member.call<{ id: string }>('POST', '/records', 201, form)
    stats.uploads++

    const t0 = performance.now()
    const run = await member.call<{ id: string }>('POST', '/runs', 202, { recordId: record.id })
    stats.runs++
    const status = await member.finalStatus(run.id)
    if (status !== 'succeeded') throw new Failure(`run ${run.id} ${status}`)
    stats.runCompletions.push(performance.now() - t0)

    await member.call('GET', `/runs/${run.id}`, 200)
    await member.call('GET', `/runs/${run.id}/spectrum`, 200)
    await member.call('GET', `/records/${record.id}/samples`, 200)
    await member.call('GET', '/runs', 200)
    await member.call('GET', '/records', 200)
    await member.call('GET', '/credits', 200)
  }
}

function percentile(values: number[], p: number): number {
  if (values.length === 0) return NaN
  const sorted = [...values].sort((a, b) => a - b)
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]!
}
const ms = (v: number) => `${v.toFixed(0)} ms`

/** Adds engineers straight into the database (as an admin's accepted invitations would). */
async function addMembers(databasePath: string, count: number): Promise<string[]> {
  const passwordHash = await hashPassword(PASSWORD, 4)
  const db = new Database(databasePath)
  db.pragma('busy_timeout = 5000')
  const firm = db
    .prepare(
      "select firm_id as firmId from memberships m join users u on u.id = m.user_id where u.email = 'admin@ordinate.test'",
    )
    .get() as {
    firmId: string
  }
  const emails = Array.from(
    { length: count },
    (_, i) => `load-${String(i + 1).padStart(2, '0')}@ordinate.test`,
  )
  const insertUser = db.prepare(
    'insert into users (id, email, name, password_hash, created_at) values (?, ?, ?, ?, ?)',
  )
  const insertMembership = db.prepare(
    'insert into memberships (id, firm_id, user_id, roles, created_at) values (?, ?, ?, ?, ?)',
  )
  db.transaction(() => {
    for (const [i, email] of emails.entries()) {
      const userId = newId()
      insertUser.run(userId, email, `Load Engineer ${i + 1}`, passwordHash, Date.now())
      insertMembership.run(newId(), firm.firmId, userId, JSON.stringify(['engineer']), Date.now())
    }
  })()
  db.close()
  return emails
}

interface LedgerCheck {
  balance: number
  problems: string[]
  runsByStatus: Record<string, number>
}

/** The demo firm's id: the firm of admin@ordinate.test. */
function demoFirmId(db: Database.Database): string {
  return (
    db
      .prepare(
        "select firm_id as f from memberships m join users u on u.id = m.user_id where u.email = 'admin@ordinate.test'",
      )
      .get() as { f: string }
  ).f
}

/** The ids of the demo firm's runs (those the demo data seeded, read before the load starts). */
function demoFirmRunIds(databasePath: string): Set<string> {
  const db = new Database(databasePath, { readonly: true })
  try {
    const rows = db.prepare('select id from runs where firm_id = ?').all(demoFirmId(db)) as { id: string }[]
    return new Set(rows.map((row) => row.id))
  } finally {
    db.close()
  }
}

/**
 * The ledger must balance: every run reserved once, failed runs returned once, purchases credited
 * once, and the balance moved from the start by the purchases less the runs charged since (runs in
 * `before`, seeded by the demo data, were paid for before the start balance was read).
 */
function checkLedger(
  databasePath: string,
  startBalance: number,
  purchasedCredits: number,
  before: ReadonlySet<string>,
): LedgerCheck {
  const db = new Database(databasePath, { readonly: true })
  try {
    const problems: string[] = []
    const firmId = demoFirmId(db)
    const balance = (
      db.prepare('select coalesce(sum(delta), 0) as b from credit_ledger where firm_id = ?').get(firmId) as {
        b: number
      }
    ).b
    const runs = db.prepare('select id, status from runs where firm_id = ?').all(firmId) as {
      id: string
      status: string
    }[]
    const runsByStatus: Record<string, number> = {}
    for (const run of runs) {
      runsByStatus[run.status] = (runsByStatus[run.status] ?? 0) + 1
      const kinds = (
        db.prepare('select kind from credit_ledger where run_id = ? order by id').all(run.id) as {
          kind: string
        }[]
      ).map((r) => r.kind)
      const expected = run.status === 'failed' ? ['run_reserved', 'run_returned'] : ['run_reserved']
      if (kinds.join() !== expected.join())
        problems.push(`run ${run.id} (${run.status}): ledger ${kinds.join(', ') || 'empty'}`)
    }
    const purchaseRows = (
      db
        .prepare(
          "select coalesce(sum(delta), 0) as d from credit_ledger where firm_id = ? and kind = 'purchase'",
        )
        .get(firmId) as { d: number }
    ).d
    if (purchaseRows !== purchasedCredits)
      problems.push(`purchases credited ${purchaseRows}, bought ${purchasedCredits}`)
    const charged = runs.filter((r) => r.status !== 'failed' && !before.has(r.id)).length
    if (balance !== startBalance + purchasedCredits - charged) {
      problems.push(`balance ${balance} ≠ ${startBalance} + ${purchasedCredits} − ${charged} charged runs`)
    }
    return { balance, problems, runsByStatus }
  } finally {
    db.close()
  }
}

async function main() {
  const bench = await startBenchServer()
  const { server, databasePath } = bench
  const stats: Stats = { reads: [], runCompletions: [], uploads: 0, runs: 0, errors: [] }
  let exitCode = 0
  try {
    console.log(
      `Load test: ${MEMBERS} members for ${DURATION_S} s on ${server.url} (compiled server, ${availableParallelism()} core(s), Node ${process.version})`,
    )
    const admin = new Member(server.url, 'admin@ordinate.test', { ...stats, reads: [] })
    await admin.signIn('ordinate-demo')
    const startBalance = (await admin.call<{ balance: number }>('GET', '/credits', 200)).balance
    const runsBefore = demoFirmRunIds(databasePath)
    let purchased = 0
    for (let i = 0; i < PACKS; i++) {
      const result = await admin.call<{ purchase: { credits: number } }>('POST', '/credits/purchases', 201, {
        packId: 'pack-200',
        cardToken: 'tok_visa',
        purchaseId: crypto.randomUUID(),
      })
      purchased += result.purchase.credits
    }
    console.log(
      `Credits: ${startBalance} to start, ${purchased} bought in ${PACKS} purchases through the API.`,
    )

    const emails = await addMembers(databasePath, MEMBERS)
    const members = emails.map((email) => new Member(server.url, email, stats))
    await Promise.all(members.map((m) => m.signIn(PASSWORD)))

    const t0 = performance.now()
    const deadline = t0 + DURATION_S * 1000
    const outcomes = await Promise.allSettled(members.map((m, i) => work(m, i, deadline, stats)))
    const wallS = (performance.now() - t0) / 1000
    for (const o of outcomes)
      if (o.status === 'rejected')
        stats.errors.push(o.reason instanceof Error ? o.reason.message : String(o.reason))

    const ledger = checkLedger(databasePath, startBalance, purchased, runsBefore)
    console.log(`\n${wallS.toFixed(1)} s of load (new work stops at ${DURATION_S} s; runs in flight finish):`)
    console.log(
      `  uploads ${stats.uploads}, runs ${stats.runs} (${(stats.runs / wallS).toFixed(2)} runs/s), reads ${stats.reads.length}`,
    )
    console.log(
      `  reads:          p50 ${ms(percentile(stats.reads, 50))}   p95 ${ms(percentile(stats.reads, 95))}   max ${ms(Math.max(...stats.reads))}`,
    )
    console.log(
      `  run completion: p50 ${ms(percentile(stats.runCompletions, 50))}   p95 ${ms(percentile(stats.runCompletions, 95))}   max ${ms(Math.max(...stats.runCompletions))}   (POST /api/runs → succeeded)`,
    )
    console.log(
      `  runs by status: ${JSON.stringify(ledger.runsByStatus)}; balance at the end ${ledger.balance}`,
    )
    console.log(`  errors: ${stats.errors.length}`)
    for (const e of stats.errors.slice(0, 10)) console.log(`    ${e}`)
    console.log(`  ledger: ${ledger.problems.length === 0 ? 'balances' : 'DOES NOT BALANCE'}`)
    for (const p of ledger.problems.slice(0, 10)) console.log(`    ${p}`)
    if (stats.errors.length > 0 || ledger.problems.length > 0 || stats.runs === 0) exitCode = 1
  } finally {
    await bench.stop()
  }
  process.exit(exitCode)
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : err)
  process.exit(1)
})
