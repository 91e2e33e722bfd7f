import { existsSync } from 'node:fs'
import path from 'node:path'
import { fileURLToPath } from 'node:url'

/**
 * The folder holding package.json, found by walking up from this file, so paths such as
 * drizzle/ and dist/ resolve the same from TypeScript sources and from compiled dist-server/.
 */
export function projectRoot(): string {
  let dir = path.dirname(fileURLToPath(import.meta.url))
  while (!existsSync(path.join(dir, 'package.json'))) {
    const parent = path.dirname(dir)
    if (parent === dir) throw new Error('package.json not found above ' + fileURLToPath(import.meta.url))
    dir = parent
  }
  return dir
}

/** True when running the compiled JavaScript in dist-server/. */
export function isCompiled(): boolean {
  return fileURLToPath(import.meta.url).endsWith('.js')
}
