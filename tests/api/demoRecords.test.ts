import { existsSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { migrateDb, openDb, type Db } from '../../server/db/client.js'
import { projects, records } from '../../server/db/schema.js'
import { getComparisonView } from '../../server/services/comparisons.js'
import { creditBalance, creditsSummary } from '../../server/services/credits.js'
import { seedDemoData, type DemoSeed } from '../../server/services/demoData.js'
import { loadRecordSamples } from '../../server/services/records.js'
import { listReviews } from '../../server/services/reviews.js'
import { getRunBatch } from '../../server/services/runBatches.js'
import { getRunSpectrum, listRuns } from '../../server/services/runs.js'
import { computeSpectrum } from '../../shared/spectra/computeSpectrum.js'
import { ledgerProblems } from '../support/ledgerAudit.js'

let dataDir: string
let db: Db
let seed: DemoSeed

beforeAll(async () => {
  dataDir = mkdtempSync(path.join(tmpdir(), 'ordinate-demo-'))
  db = openDb(path.join(dataDir, 'demo.sqlite'))
  migrateDb(db)
  seed = (await seedDemoData(db, { dataDir }))!
})
afterAll(() => {
  db.$client.close()
  rmSync(dataDir, { recursive: true, force: true })
})

describe('seedDemoData with a data folder', () => {
  it('adds five synthetic records to the demo firm’s default project, uploaded by the demo engineer', () => {
    expect(seed.recordIds).toHaveLength(5)
    const rows = db.select().from(records).all()
    expect(rows).toHaveLength(5)
    const project = db.select().from(projects).where(eq(projects.id, seed.projectIds[0]!)).get()!
    expect(project).toMatchObject({ name: 'Tidewater Library Annex', isDefault: true })
    for (const r of rows) {
      expect(r.synthetic).toBe(true)
      expect(r.name).toMatch(/synthetic/i)
      expect(r.projectId).toBe(project.id)
      expect(r.firmId).toBe(seed.firmIds[0])
      expect(r.uploadedBy).toBe(seed.userIds['engineer@ordinate.test'])
      // A processed record has no file of its own: its hash is that of its stored samples.
      expect(existsSync(path.join(dataDir, 'originals', r.sha256))).toBe(r.parentId === null)
    }
  })

  it('adds a record with a baseline drift and its processed child, whose drift is gone', () => {
    const [rawId, childId] = seed.recordIds.slice(3)
    const raw = db.select().from(records).where(eq(records.id, rawId!)).get()!
    const child = db.select().from(records).where(eq(records.id, childId!)).get()!
    expect(raw.parentId).toBeNull()
    expect(raw.warnings.some((w) => /baseline/.test(w))).toBe(true)
    expect(child.parentId).toBe(raw.id)
    expect(child.processing).toMatchObject({ highPass: { hz: 0.1, order: 4 }, pads: 'keep' })
    expect(child.warnings.some((w) => /baseline/.test(w))).toBe(false)
  })

  it('gives the runs service samples it can load', () => {
    const { record, accelMPerS2 } = loadRecordSamples(db, seed.firmIds[0]!, seed.recordIds[0]!)
    expect(accelMPerS2).toHaveLength(record.points)
    expect(Math.max(...accelMPerS2.map(Math.abs))).toBeCloseTo(record.pgaMPerS2, 12)
  })

  it('adds nothing to the second firm', () => {
    expect(db.select().from(records).where(eq(records.firmId, seed.firmIds[1]!)).all()).toHaveLength(0)
  })

  it('seeds nothing a second time', async () => {
    expect(await seedDemoData(db, { dataDir })).toBeUndefined()
    expect(db.select().from(records).all()).toHaveLength(5)
  })
})

describe('seedDemoData’s finished work', () => {
  it('seeds four succeeded runs of the demo firm, each with a stored spectrum', () => {
    const firmId = seed.firmIds[0]!
    const runs = listRuns(db, firmId, {})
    expect(runs.map((r) => r.id).sort()).toEqual([...seed.work!.runIds].sort())
    for (const run of runs) {
      expect(run.status).toBe('succeeded')
      expect(run.creditsCharged).toBe(1)
      expect(run.settings.periodsS).toHaveLength(60)
      const { result } = getRunSpectrum(db, firmId, run.id)
      expect(result.curves.length).toBe(run.settings.dampingRatios.length)
    }
  })

  it('stores the engine’s own ordinates: a seeded run equals the same record computed again', () => {
    const firmId = seed.firmIds[0]!
    const runId = seed.work!.runIds[3]!
    const { run, result } = getRunSpectrum(db, firmId, runId)
    const { accelMPerS2, record } = loadRecordSamples(db, firmId, run.recordId!)
    const again = computeSpectrum(
      { accelMPerS2: Float64Array.from(accelMPerS2), dtS: record.dtS },
      {
        method: run.settings.method,
        dampingRatios: run.settings.dampingRatios,
        periodsS: run.settings.periodsS,
      },
    )
    expect(result.curves.map((c) => c.dampingRatio)).toEqual([0.02, 0.05])
    result.curves.forEach((curve, k) => {
      expect(curve.psaMPerS2).toEqual(Array.from(again.curves[k]!.psaMPerS2))
    })
  })

  it('seeds one finished batch of three demo records', () => {
    const batch = getRunBatch(db, seed.firmIds[0]!, seed.work!.batchId)
    expect(batch.finished).toBe(true)
    expect(batch.counts).toEqual({ queued: 0, running: 0, succeeded: 3, failed: 0 })
    expect(batch.recordIds).toEqual(seed.recordIds.slice(2))
    expect(batch.projectId).toBe(seed.projectIds[0])
  })

  it('seeds a comparison of the batch’s runs but the uncorrected one against a design target, waiting in the checker’s queue', () => {
    const view = getComparisonView(db, seed.firmIds[0]!, seed.work!.comparisonId)
    const [longDuration, , corrected] = seed.work!.runIds
    expect(view.comparison.runIds).toEqual([longDuration, corrected])
    expect(view.comparison.reviewState).toBe('submitted')
    expect(view.target?.label).toMatch(/ASCE 7-16/)
    expect(view.scaling?.check).toBeDefined()
    const checker = {
      userId: seed.userIds['checker@ordinate.test']!,
      email: 'checker@ordinate.test',
      name: 'Tomas Verhoek',
      firmId: seed.firmIds[0]!,
      firmName: 'Halvorsen Kade Structural',
      membershipId: '',
      roles: ['checker' as const],
    }
    const queue = listReviews(db, checker, { state: 'submitted' })
    expect(queue.map((r) => r.subjectId)).toEqual([seed.work!.comparisonId])
  })

  it('balances the ledger: a demo grant for the seeded runs beside their reservations, the opening balance kept', () => {
    const firmId = seed.firmIds[0]!
    const { entries } = creditsSummary(db, firmId)
    const reserved = entries.filter((e) => e.kind === 'run_reserved')
    expect(reserved.map((e) => e.runId).sort()).toEqual([...seed.work!.runIds].sort())
    expect(entries.filter((e) => e.kind === 'run_returned')).toHaveLength(0)
    expect(entries.filter((e) => e.kind === 'grant').map((e) => e.delta)).toEqual([4, 25])
    expect(creditBalance(db, firmId)).toBe(25)
    expect(creditBalance(db, seed.firmIds[1]!)).toBe(5)
    expect(ledgerProblems(path.join(dataDir, 'demo.sqlite'))).toEqual([])
  })

  it('adds no work a second time', async () => {
    expect(await seedDemoData(db, { dataDir })).toBeUndefined()
    expect(listRuns(db, seed.firmIds[0]!, {})).toHaveLength(4)
    expect(listRuns(db, seed.firmIds[1]!, {})).toHaveLength(0)
  })
})
