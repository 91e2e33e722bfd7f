import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import path from 'node:path'
import request from 'supertest'
import type { Express } from 'express'
import { createApp } from '../../server/app.js'
import { loadConfig, type Config } from '../../server/config.js'
import { migrateDb, openDb, type Db } from '../../server/db/client.js'
import type { AppDeps } from '../../server/deps.js'
import { DEMO_PASSWORD, seedDemoData, type DemoSeed } from '../../server/services/demoData.js'

export interface TestContext {
  app: Express
  db: Db
  deps: AppDeps
  seed: DemoSeed
  dataDir: string
  /** A supertest agent signed in as the given demo member, sending the CSRF header on every request. */
  signIn(email: string, password?: string): Promise<request.Agent>
  /** A signed-out agent that sends the CSRF header. */
  anonymous(): request.Agent
  close(): void
}

/**
 * A fresh app on a temporary SQLite file migrated from drizzle/ and loaded with the demo data.
 * `extend` lets a test add deps (mail, payments, run queue) before the app is built.
 */
export async function createTestContext(
  extend: (deps: AppDeps) => void | Promise<void> = () => {},
  env: NodeJS.ProcessEnv = {},
): Promise<TestContext> {
  const dataDir = mkdtempSync(path.join(tmpdir(), 'ordinate-test-'))
  const config: Config = loadConfig({
    NODE_ENV: 'test',
    DATABASE_PATH: path.join(dataDir, 'test.sqlite'),
    ...env,
  })
  const db = openDb(config.databasePath)
  migrateDb(db)
  const seed = await seedDemoData(db)
  if (!seed) throw new Error('demo data was not seeded')
  const deps: AppDeps = {
    db,
    config,
    sessionSecret: 'test-secret-0123456789abcdef',
    sessionCookieName: 'ordinate.sid',
    log: () => {},
  }
  await extend(deps)
  const app = createApp(deps)
  const withCsrf = (agent: request.Agent) => agent.set('x-ordinate-client', '1')
  return {
    app,
    db,
    deps,
    seed,
    dataDir,
    anonymous: () => withCsrf(request.agent(app)),
    async signIn(email, password = DEMO_PASSWORD) {
      const agent = withCsrf(request.agent(app))
      const res = await agent.post('/api/auth/sign-in').send({ email, password })
      if (res.status !== 200)
        throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`)
      return agent
    },
    close() {
      db.$client.close()
      rmSync(dataDir, { recursive: true, force: true })
    },
  }
}

/** The four demo members most API tests act as (one of them in another firm), signed in. */
export async function signInDemoMembers(ctx: TestContext) {
  const signIn = (who: string) => ctx.signIn(`${who}@ordinate.test`)
  const [engineer, checker, admin, outsider] = await Promise.all([
    signIn('engineer'),
    signIn('checker'),
    signIn('admin'),
    signIn('outsider'),
  ])
  return { engineer, checker, admin, outsider }
}
