import type { Role } from '../../shared/schemas/accounts.js'
import type { Db } from '../db/client.js'
import { creditLedger, firms, memberships, projects, users } from '../db/schema.js'
import { newId } from '../ids.js'
import { hashPassword } from './auth.js'

export const DEMO_PASSWORD = 'ordinate-demo'

/** The fictional firms and members of the demo; README lists them. */
export const DEMO_FIRMS = [
  {
    name: 'Halvorsen Kade Structural',
    project: { name: 'Tidewater Library Annex', description: 'Demo project: seismic retrofit of a three-storey library annex (fictional).' },
    credits: 25,
    members: [
      { email: 'engineer@ordinate.test', name: 'Ines Marlowe', roles: ['engineer'] as Role[] },
      { email: 'checker@ordinate.test', name: 'Tomas Verhoek', roles: ['checker'] as Role[] },
      { email: 'admin@ordinate.test', name: 'Ruth Okonkwo-Baines', roles: ['admin'] as Role[] },
    ],
  },
  {
    name: 'Brightwater Consulting',
    project: { name: 'Quayside Car Park', description: 'Demo project of a second firm, to show that firms cannot see each other (fictional).' },
    credits: 5,
    members: [{ email: 'outsider@ordinate.test', name: 'Pella Strand', roles: ['engineer'] as Role[] }],
  },
] as const

export interface DemoSeed {
  firmIds: string[]
  projectIds: string[]
  userIds: Record<string, string>
}

/** Inserts the demo firms, members, default projects and opening credits into an empty database. */
export async function seedDemoData(db: Db): Promise<DemoSeed | undefined> {
  if (db.select({ id: firms.id }).from(firms).limit(1).get()) return undefined
  const passwordHash = await hashPassword(DEMO_PASSWORD)
  const seed: DemoSeed = { firmIds: [], projectIds: [], userIds: {} }
  db.transaction((tx) => {
    for (const f of DEMO_FIRMS) {
      const firmId = newId()
      tx.insert(firms).values({ id: firmId, name: f.name }).run()
      const projectId = newId()
      tx.insert(projects)
        .values({ id: projectId, firmId, name: f.project.name, description: f.project.description, isDefault: true })
        .run()
      for (const m of f.members) {
        const userId = newId()
        tx.insert(users).values({ id: userId, email: m.email, name: m.name, passwordHash }).run()
        tx.insert(memberships).values({ id: newId(), firmId, userId, roles: [...m.roles] }).run()
        seed.userIds[m.email] = userId
      }
      tx.insert(creditLedger)
        .values({ firmId, delta: f.credits, kind: 'grant', note: 'Demo opening balance' })
        .run()
      seed.firmIds.push(firmId)
      seed.projectIds.push(projectId)
    }
  })
  return seed
}
