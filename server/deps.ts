import type { Config } from './config.js'
import type { Db } from './db/client.js'

/**
 * Everything createApp needs, built by server/index.ts (or by a test). Later services
 * (mail, payments, run queue) are added here as fields so routes receive them explicitly.
 */
export interface AppDeps {
  db: Db
  config: Config
  sessionSecret: string
  sessionCookieName: string
  log: (line: string) => void
}
