import { copyFileSync, existsSync, mkdirSync, readdirSync, rmSync } from 'node:fs'
import path from 'node:path'
import Database from 'better-sqlite3'

export interface BackupResult {
  databaseCopy: string
  originalsCopy: string
  originalsCopied: number
}

/** Where a backup keeps its copy of the original record files: beside the database copy. */
export function originalsCopyDir(databaseCopy: string): string {
  return `${databaseCopy}.originals`
}

/**
 * Writes a consistent copy of a live database with SQLite's online backup (through
 * better-sqlite3), then copies the original record files. The database is copied first:
 * an original is written before the row that names it, so every original the copy refers to
 * is already on disk when the files are copied. Originals are named by their SHA-256 and
 * never change, so one already in the backup folder is skipped.
 */
export async function backupDatabase(options: {
  databasePath: string
  dataDir: string
  target: string
}): Promise<BackupResult> {
  const databaseCopy = path.resolve(options.target)
  if (path.resolve(options.databasePath) === databaseCopy)
    throw new Error('the backup file must not be the database itself')
  mkdirSync(path.dirname(databaseCopy), { recursive: true })
  const source = new Database(options.databasePath, { fileMustExist: true })
  try {
    source.pragma('busy_timeout = 5000')
    const temp = `${databaseCopy}.partial`
    rmSync(temp, { force: true })
    await source.backup(temp)
    rmSync(databaseCopy, { force: true })
    copyFileSync(temp, databaseCopy)
    rmSync(temp, { force: true })
  } finally {
    source.close()
  }

  const originalsCopy = originalsCopyDir(databaseCopy)
  mkdirSync(originalsCopy, { recursive: true })
  const originals = path.join(options.dataDir, 'originals')
  let originalsCopied = 0
  if (existsSync(originals)) {
    for (const name of readdirSync(originals)) {
      if (!/^[0-9a-f]{64}$/.test(name)) continue
      const to = path.join(originalsCopy, name)
      if (existsSync(to)) continue
      copyFileSync(path.join(originals, name), to)
      originalsCopied++
    }
  }
  return { databaseCopy, originalsCopy, originalsCopied }
}

/**
 * Puts a backup in place for a server that is not running: the database file (its old WAL
 * and shared-memory files removed, since they belong to the replaced file) and the originals.
 */
export function restoreBackup(options: { backup: string; databasePath: string; dataDir: string }): void {
  const backup = path.resolve(options.backup)
  if (!existsSync(backup)) throw new Error(`no backup at ${backup}`)
  mkdirSync(path.dirname(path.resolve(options.databasePath)), { recursive: true })
  for (const suffix of ['-wal', '-shm']) rmSync(`${options.databasePath}${suffix}`, { force: true })
  copyFileSync(backup, options.databasePath)
  const originals = path.join(options.dataDir, 'originals')
  mkdirSync(originals, { recursive: true })
  const from = originalsCopyDir(backup)
  if (!existsSync(from)) return
  for (const name of readdirSync(from)) {
    if (!existsSync(path.join(originals, name)))
      copyFileSync(path.join(from, name), path.join(originals, name))
  }
}
