/**
 * Backs up a running (or stopped) Ordinate: `npm run backup -- FILE` writes a consistent copy of
 * the SQLite database to FILE and the original record files to FILE.originals/.
 * `npm run backup -- --restore FILE` puts a backup in place; stop the server first.
 * Reads DATABASE_PATH and DATA_DIR as the server does.
 */
import { loadConfig } from '../server/config.js'
import { backupDatabase, restoreBackup } from '../server/db/backup.js'

async function main(args: string[]) {
  const restore = args[0] === '--restore'
  const file = restore ? args[1] : args[0]
  if (!file || args.length > (restore ? 2 : 1)) {
    console.error('usage: npm run backup -- FILE   |   npm run backup -- --restore FILE')
    process.exit(2)
  }
  const config = loadConfig()
  if (restore) {
    restoreBackup({ backup: file, databasePath: config.databasePath, dataDir: config.dataDir })
    console.log(`Restored ${file} into ${config.databasePath} (originals into ${config.dataDir}/originals).`)
    return
  }
  const result = await backupDatabase({
    databasePath: config.databasePath,
    dataDir: config.dataDir,
    target: file,
  })
  console.log(
    `Backed up ${config.databasePath} to ${result.databaseCopy}; ${result.originalsCopied} original file(s) copied to ${result.originalsCopy}.`,
  )
}

main(process.argv.slice(2)).catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : err)
  process.exit(1)
})
