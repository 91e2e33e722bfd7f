import type { Role } from '../../shared/schemas/accounts.js'
import { demoRecords } from '../../shared/spectra/demo/demoRecords.js'
import type { Db } from '../db/client.js'
import { creditLedger, firms, memberships, projects, users } from '../db/schema.js'
import { newId } from '../ids.js'
import { hashPassword } from './auth.js'
import { DEMO_PROCESSING, driftingDemoRecord } from '../../shared/spectra/processing/demoDriftingRecord.js'
import { createProcessedRecord } from './recordProcessing.js'
import { createRecord } from './records.js'

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
}

export interface SeedOptions {
  /**
   * The data folder (config.dataDir). When given, the engine's three synthetic records are added
   * to the demo firm's default project, uploaded by the demo engineer, with their originals kept
   * under `<dataDir>/originals/` like any upload. (None of the three share Δt and length, so no
   * demo pair is made.) Then a fourth, with a baseline offset and drift, and its processed child
   * (record processing), so the demo firm has five records.
   */
  dataDir?: string
}

/** Inserts the demo firms, members, default projects and opening credits into an empty database. */
export async function seedDemoData(db: Db, options: SeedOptions = {}): Promise<DemoSeed | undefined> {
  if (db.select({ id: firms.id }).from(firms).limit(1).get()) return undefined
  const passwordHash = await hashPassword(DEMO_PASSWORD)
  const seed: DemoSeed = { firmIds: [], projectIds: [], userIds: {}, recordIds: [] }
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
        tx.insert(users).values({ id: userId, email: m.email, name: m.name, passwordHash }).run()
        tx.insert(memberships)
          .values({ id: newId(), firmId, userId, roles: [...m.roles] })
          .run()
        seed.userIds[m.email] = userId
      }
      tx.insert(creditLedger)
        .values({ firmId, delta: f.credits, kind: 'grant', note: 'Demo opening balance' })
        .run()
      seed.firmIds.push(firmId)
      seed.projectIds.push(projectId)
    }
  })
  if (options.dataDir) {
    const engineer = { userId: seed.userIds['engineer@ordinate.test']!, firmId: seed.firmIds[0]! }
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
  }
  return seed
}
