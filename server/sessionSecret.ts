import { randomBytes } from 'node:crypto'
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import path from 'node:path'

/** SESSION_SECRET when set; otherwise a random secret generated once and kept in the data folder. */
export function resolveSessionSecret(configured: string | undefined, dataDir: string): string {
  if (configured) return configured
  const file = path.join(dataDir, 'session-secret')
  if (existsSync(file)) return readFileSync(file, 'utf8').trim()
  mkdirSync(dataDir, { recursive: true })
  const secret = randomBytes(32).toString('hex')
  writeFileSync(file, secret + '\n', { mode: 0o600 })
  return secret
}
