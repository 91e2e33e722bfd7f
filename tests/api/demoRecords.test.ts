import { existsSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { migrateDb, openDb, type Db } from '../../server/db/client.js'
import { projects, records } from '../../server/db/schema.js'
import { seedDemoData, type DemoSeed } from '../../server/services/demoData.js'
import { loadRecordSamples } from '../../server/services/records.js'

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
