import type { AddressInfo } from 'node:net'
import { createApp } from './app.js'
import { loadConfig } from './config.js'
import { migrateDb, openDb } from './db/client.js'
import type { AppDeps } from './deps.js'
import { startMail } from './mail/startMail.js'
import { createPayments } from './payments/payments.js'
import { createRunScheduler } from './runs/runScheduler.js'
import { seedDemoData } from './services/demoData.js'
import { resolveSessionSecret } from './sessionSecret.js'

async function main() {
  const config = loadConfig()
  const log = (line: string) => console.log(line)
  const db = openDb(config.databasePath)
  migrateDb(db)
  if (config.demoData) {
    const origin = config.publicUrl
      ? new URL(config.publicUrl).origin
      : `http://${config.host}:${config.port}`
    const seeded = await seedDemoData(db, { dataDir: config.dataDir, origin })
    if (seeded) log('Demo data loaded (see README for the demo accounts).')
  }

  const mail = await startMail(db, config, log)
  const payments = await createPayments(config.stripe, { log })
  log(`Payments: ${payments.mode} mode, through ${payments.endpoint}.`)
  const runQueue = createRunScheduler(config, db, log)
  runQueue.start()
  log(
    config.redisUrl
      ? `Run queue: BullMQ on Redis, ${runQueue.workerCount} worker thread(s) in this process.`
      : `Run queue: up to ${runQueue.workerCount} worker thread(s).`,
  )
  const deps: AppDeps = {
    db,
    config,
    sessionSecret: resolveSessionSecret(config.sessionSecret, config.dataDir),
    sessionCookieName: 'ordinate.sid',
    log,
    mailDispatcher: mail.mailDispatcher,
    devMailbox: mail.devMailbox,
    payments,
    runQueue,
  }
  const app = createApp(deps)
  const server = app.listen(config.port, config.host, () => {
    const { port } = server.address() as AddressInfo
    log(`Ordinate listening on http://${config.host}:${port}`)
  })

  let stopping = false
  const stop = (signal: string) => {
    if (stopping) return
    stopping = true
    log(`${signal} received: closing.`)
    server.close(() => {
      void Promise.all([mail.stop(), payments.close(), runQueue.stop(3000)]).finally(() => {
        db.$client.close()
        process.exit(0)
      })
    })
    server.closeAllConnections()
    setTimeout(() => process.exit(0), 5000).unref()
  }
  process.on('SIGTERM', () => stop('SIGTERM'))
  process.on('SIGINT', () => stop('SIGINT'))
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : err)
  process.exit(1)
})
