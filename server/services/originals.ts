import { randomUUID } from 'node:crypto'
import { existsSync, mkdirSync, renameSync, rmSync, writeFileSync } from 'node:fs'
import path from 'node:path'

/** Where the original bytes of an uploaded record live: named by their SHA-256, never by the uploaded file name. */
export function originalPath(dataDir: string, sha256: string): string {
  if (!/^[0-9a-f]{64}$/.test(sha256)) throw new RangeError('sha256 must be 64 lowercase hex digits')
  return path.join(dataDir, 'originals', sha256)
}

/**
 * Keeps the original bytes under their hash. The file is written beside its final name and
 * renamed into place, so a reader never sees a partial file. When a file with that hash is
 * already there it holds the same bytes and is left untouched (originals are never altered).
 * Answers whether this call created the file, so a failed insert can take it back.
 */
export function storeOriginal(dataDir: string, sha256: string, bytes: Uint8Array): { created: boolean } {
  const target = originalPath(dataDir, sha256)
  if (existsSync(target)) return { created: false }
  mkdirSync(path.dirname(target), { recursive: true })
  const temp = path.join(path.dirname(target), `.upload-${randomUUID()}`)
  try {
    writeFileSync(temp, bytes, { flag: 'wx', mode: 0o444 })
    renameSync(temp, target)
  } catch (err) {
    rmSync(temp, { force: true })
    throw err
  }
  return { created: true }
}

export function removeOriginal(dataDir: string, sha256: string): void {
  rmSync(originalPath(dataDir, sha256), { force: true })
}
