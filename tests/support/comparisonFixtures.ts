import { eq } from 'drizzle-orm'
import type { Db } from '../../server/db/client.js'
import { recordPairs, records, runs, spectra } from '../../server/db/schema.js'
import { newId } from '../../server/ids.js'
import { STANDARD_GRAVITY_M_PER_S2 } from '../../shared/spectra/units.js'
import { insertRecord } from './runFixtures.js'

/** One curve of a stored spectrum, given as PSA in g (the other quantities follow from it). */
export interface FixtureCurve {
  dampingRatio: number
  psaG: number[]
  combination?: 'geomean' | 'rotd50' | 'rotd100'
}

/**
 * Inserts a record (or a pair of records) and a succeeded run of it with a stored spectrum of
 * the given PSA curves, so comparison and review tests need no worker. The spectra are invented
 * test numbers.
 */
export function insertSucceededRun(
  db: Db,
  owner: { firmId: string; projectId: string; userId: string },
  options: {
    name: string
    periodsS: number[]
    curves: FixtureCurve[]
    pair?: boolean
    /** A run of this existing record (or a pair with it as first component) instead of a new one. */
    recordId?: string
  },
): string {
  const uploader = { firmId: owner.firmId, projectId: owner.projectId, uploadedBy: owner.userId }
  const record = options.recordId
    ? db
        .select({ id: records.id, sha256: records.sha256 })
        .from(records)
        .where(eq(records.id, options.recordId))
        .get()!
    : insertRecord(db, uploader, { name: options.name, points: 200 })
  let pairId: string | null = null
  if (options.pair) {
    const second = insertRecord(db, uploader, { name: `${options.name} (second component)`, points: 200 })
    pairId = newId()
    db.insert(recordPairs)
      .values({
        id: pairId,
        firmId: owner.firmId,
        projectId: owner.projectId,
        name: options.name,
        record1Id: record.id,
        record2Id: second.id,
        createdBy: owner.userId,
      })
      .run()
  }
  const runId = newId()
  const now = Date.now()
  db.insert(runs)
    .values({
      id: runId,
      firmId: owner.firmId,
      projectId: owner.projectId,
      recordId: pairId ? null : record.id,
      pairId,
      status: 'succeeded',
      progress: 1,
      settings: {
        method: 'newmark-average',
        dampingRatios: [...new Set(options.curves.map((c) => c.dampingRatio))],
        periodsS: options.periodsS,
        periodChoice: 'list',
        periodGrid: null,
      },
      creditsCharged: 1,
      recordSha256: record.sha256,
      engineVersion: 'test-fixture',
      createdBy: owner.userId,
      createdAt: now,
      startedAt: now,
      finishedAt: now,
    })
    .run()
  const curves = options.curves.map((c) => {
    const psaMPerS2 = c.psaG.map((v) => v * STANDARD_GRAVITY_M_PER_S2)
    const sdM = psaMPerS2.map((a, i) => a / ((2 * Math.PI) / (options.periodsS[i] as number)) ** 2)
    const psvMPerS = psaMPerS2.map((a, i) => a / ((2 * Math.PI) / (options.periodsS[i] as number)))
    return {
      dampingRatio: c.dampingRatio,
      ...(c.combination ? { combination: c.combination } : {}),
      sdM,
      svMPerS: psvMPerS,
      saMPerS2: psaMPerS2,
      psvMPerS,
      psaMPerS2,
    }
  })
  db.insert(spectra)
    .values({ runId, result: { periodsS: options.periodsS, curves }, createdAt: now })
    .run()
  return runId
}

/** Marks a run queued again (no spectrum), to test refusals of unfinished runs. */
export function markRunQueued(db: Db, runId: string): void {
  db.delete(spectra).where(eq(spectra.runId, runId)).run()
  db.update(runs).set({ status: 'queued', progress: 0, finishedAt: null }).where(eq(runs.id, runId)).run()
}
