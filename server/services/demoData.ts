import type { Role } from '../../shared/schemas/accounts.js'
import { createComparisonBodySchema } from '../../shared/schemas/comparisons.js'
import { createRunBatchBodySchema } from '../../shared/schemas/runBatches.js'
import { runRequestSchema } from '../../shared/schemas/runs.js'
import { workerReplySchema, type SpectrumJob } from '../../shared/schemas/spectrumWorker.js'
import { computeSpectrum } from '../../shared/spectra/computeSpectrum.js'
import { demoRecords } from '../../shared/spectra/demo/demoRecords.js'
import type { Db } from '../db/client.js'
import { creditLedger, firms, memberships, projects, users } from '../db/schema.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { sqliteRunStore } from '../runs/sqliteRunStore.js'
import { workerRequestFor } from '../runs/workerRequest.js'
import { hashPassword } from './auth.js'
import { DEMO_PROCESSING, driftingDemoRecord } from '../../shared/spectra/processing/demoDriftingRecord.js'
import { createComparison } from './comparisons.js'
import { appendLedger } from './credits.js'
import { createProcessedRecord } from './recordProcessing.js'
import { createRecord } from './records.js'
import { submitReview } from './reviews.js'
import { createRun } from './runs.js'
import { createRunBatch } from './runBatches.js'

export const DEMO_PASSWORD = 'ordinate-demo'

/** The fictional firms and members of the demo; README lists them. */
export const DEMO_FIRMS = [
  {
    name: 'Halvorsen Kade Structural',
    project: {
      name: 'Tidewater Library Annex',
      description: 'Demo project: seismic retrofit of a three-storey library annex (fictional).',
    },
    credits: 25,
    members: [
      { email: 'engineer@ordinate.test', name: 'Ines Marlowe', roles: ['engineer'] as Role[] },
      { email: 'checker@ordinate.test', name: 'Tomas Verhoek', roles: ['checker'] as Role[] },
      { email: 'admin@ordinate.test', name: 'Ruth Okonkwo-Baines', roles: ['admin'] as Role[] },
    ],
  },
  {
    name: 'Brightwater Consulting',
    project: {
      name: 'Quayside Car Park',
      description: 'Demo project of a second firm, to show that firms cannot see each other (fictional).',
    },
    credits: 5,
    members: [{ email: 'outsider@ordinate.test', name: 'Pella Strand', roles: ['engineer'] as Role[] }],
  },
] as const

export interface DemoSeed {
  firmIds: string[]
  projectIds: string[]
  userIds: Record<string, string>
  /** The synthetic demo records, when seeded with a data folder for their original files. */
  recordIds: string[]
  /** With a data folder: the demo engineer's finished work on those records. */
  work?: DemoWork
}

/** The finished work the demo firm starts with, so its first screens are not empty. */
export interface DemoWork {
  /** Every seeded run, succeeded: the batch's runs first, then the single run. */
  runIds: string[]
  batchId: string
  /** A comparison of two of the batch's runs against a design target, waiting for the checker. */
  comparisonId: string
}

export interface SeedOptions {
  /**
   * The data folder (config.dataDir). When given, the engine's three synthetic records are added
   * to the demo firm's default project, uploaded by the demo engineer, with their originals kept
   * under `<dataDir>/originals/` like any upload. (None of the three share Δt and length, so no
   * demo pair is made.) Then a fourth, with a baseline offset and drift, and its processed child
   * (record processing), so the demo firm has five records. Then the demo work (seedDemoWork).
   */
  dataDir?: string
  /** Where links in the demo's checking notice point (PUBLIC_URL or the address served). */
  origin?: string
}

/** Inserts the demo firms, members, default projects and opening credits into an empty database. */
export async function seedDemoData(db: Db, options: SeedOptions = {}): Promise<DemoSeed | undefined> {
  if (db.select({ id: firms.id }).from(firms).limit(1).get()) return undefined
  const passwordHash = await hashPassword(DEMO_PASSWORD)
  const seed: DemoSeed = { firmIds: [], projectIds: [], userIds: {}, recordIds: [] }
  const membershipIds: Record<string, string> = {}
  db.transaction((tx) => {
    for (const f of DEMO_FIRMS) {
      const firmId = newId()
      tx.insert(firms).values({ id: firmId, name: f.name }).run()
      const projectId = newId()
      tx.insert(projects)
        .values({
          id: projectId,
          firmId,
          name: f.project.name,
          description: f.project.description,
          isDefault: true,
        })
        .run()
      for (const m of f.members) {
        const userId = newId()
        const membershipId = newId()
        tx.insert(users).values({ id: userId, email: m.email, name: m.name, passwordHash }).run()
        tx.insert(memberships)
          .values({ id: membershipId, firmId, userId, roles: [...m.roles] })
          .run()
        seed.userIds[m.email] = userId
        membershipIds[m.email] = membershipId
      }
      tx.insert(creditLedger)
        .values({ firmId, delta: f.credits, kind: 'grant', note: 'Demo opening balance' })
        .run()
      seed.firmIds.push(firmId)
      seed.projectIds.push(projectId)
    }
  })
  if (options.dataDir) {
    const [demoFirm] = DEMO_FIRMS
    const [member] = demoFirm.members
    const engineer: Member = {
      userId: seed.userIds[member.email]!,
      email: member.email,
      name: member.name,
      firmId: seed.firmIds[0]!,
      firmName: demoFirm.name,
      membershipId: membershipIds[member.email]!,
      roles: [...member.roles],
    }
    for (const r of demoRecords()) {
      const record = createRecord(db, options.dataDir, engineer, {
        bytes: Buffer.from(r.text, 'utf8'),
        fileName: r.fileName,
        name: r.name,
        synthetic: true,
      })
      seed.recordIds.push(record.id)
    }
    // A record with an offset and a drift, and its processed child, to show record processing.
    const drifting = driftingDemoRecord()
    const raw = createRecord(db, options.dataDir, engineer, {
      bytes: Buffer.from(drifting.text, 'utf8'),
      fileName: drifting.fileName,
      name: drifting.name,
      synthetic: true,
    })
    const child = createProcessedRecord(db, engineer, raw.id, {
      ...DEMO_PROCESSING,
      name: `${drifting.name}, corrected`,
    })
    seed.recordIds.push(raw.id, child.id)
    const longDuration = seed.recordIds[2]!
    seed.work = seedDemoWork(db, engineer, {
      batch: [longDuration, raw.id, child.id],
      leftOut: raw.id,
      single: child.id,
      origin: options.origin ?? 'http://127.0.0.1:3000',
    })
  }
  return seed
}

/** The demo runs' periods: 60 from 0.05 s to 5 s, so seeding stays quick. */
const DEMO_GRID = { minS: 0.05, maxS: 5, count: 60 }

/**
 * The demo engineer's finished work, made through the services a member's requests use:
 * - a batch of three records at ζ = 5% (the long-duration record, and the drifting record before
 *   and after its correction), and a second run of the corrected record at 2% and 5%. They are
 *   queued with their credits reserved, then computed by the engine and stored through the run
 *   queue's own store (claim, load, succeed: the path of a worker thread's result), here on this
 *   thread, so they have finished before the server listens;
 * - a comparison of the batch's runs but the uncorrected one against an ASCE 7-16 two-period
 *   target (demo site values, fictional), scaled over 0.2–2 s, and submitted for checking, so it
 *   waits in the checker's queue.
 * The runs' credits come back as one demo grant beside them, so the ledger balances and the firm
 * keeps its opening balance. The records avoid the two that the browser tests run by name.
 */
function seedDemoWork(
  db: Db,
  engineer: Member,
  subjects: { batch: string[]; leftOut: string; single: string; origin: string },
): DemoWork {
  const runsSeeded = subjects.batch.length + 1
  appendLedger(db, {
    firmId: engineer.firmId,
    delta: runsSeeded,
    kind: 'grant',
    note: `Demo data: the credits of its ${runsSeeded} finished runs`,
  })
  const batch = createRunBatch(
    db,
    engineer,
    createRunBatchBodySchema.parse({
      recordIds: subjects.batch,
      dampingRatios: [0.05],
      periodGrid: DEMO_GRID,
    }),
  )
  const single = createRun(
    db,
    engineer,
    runRequestSchema.parse({ recordId: subjects.single, dampingRatios: [0.02, 0.05], periodGrid: DEMO_GRID }),
  )
  computeQueuedRuns(db)
  const comparison = createComparison(
    db,
    engineer,
    createComparisonBodySchema.parse({
      name: 'Tidewater suite against the site design spectrum',
      runIds: batch.runIds.filter((_, i) => subjects.batch[i] !== subjects.leftOut),
      dampingRatio: 0.05,
      target: { kind: 'asce7-two-period', sdsG: 1, sd1G: 0.6, tlS: 8 },
      scaling: { fromS: 0.2, toS: 2 },
    }),
  )
  submitReview(
    db,
    engineer,
    { subjectType: 'comparison', subjectId: comparison.comparison.id },
    subjects.origin,
  )
  return { runIds: [...batch.runIds, single.id], batchId: batch.id, comparisonId: comparison.comparison.id }
}

/** A job's samples as the engine takes them (as the worker thread reads its message). */
function engineSubject(job: SpectrumJob) {
  return job.kind === 'pair'
    ? {
        accel1MPerS2: new Float64Array(job.samples1),
        accel2MPerS2: new Float64Array(job.samples2),
        dtS: job.dtS,
      }
    : { accelMPerS2: new Float64Array(job.samples), dtS: job.dtS }
}

/**
 * Computes every queued run now, on this thread, through the run store: each is claimed and
 * loaded, computed by the engine from the worker request the queue would post, and stored by
 * the store's succeed (or failed with its credit returned), exactly once.
 */
function computeQueuedRuns(db: Db): void {
  const store = sqliteRunStore(db)
  for (let claimed = store.claim(); claimed; claimed = store.claim()) {
    const startedAt = Date.now()
    try {
      const job = store.load(claimed)
      const { runId, settings } = workerRequestFor(claimed, job, claimed.settings.periodsS)
      const clock = performance.now()
      const computation = computeSpectrum(engineSubject(job), settings)
      const computeMs = performance.now() - clock
      const reply = workerReplySchema.parse({ type: 'result', runId, computation, computeMs })
      if (reply.type !== 'result') throw new Error('The engine gave no result.')
      store.succeed(claimed, reply, {
        queuedMs: startedAt - claimed.createdAt,
        computeMs,
        runMs: Date.now() - startedAt,
        parts: 1,
      })
    } catch (err) {
      store.fail(claimed, `The demo run failed: ${err instanceof Error ? err.message : String(err)}`)
    }
  }
}
