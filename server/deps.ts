import type { Config } from './config.js'
import type { Db } from './db/client.js'
import type { SmtpSink } from './mail/smtpSink.js'
import type { Payments } from './payments/payments.js'
import type { RunScheduler } from './runs/runScheduler.js'
import type { MailDispatcher } from './services/mail.js'

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
  /** Sends queued mail; routes that queue mail call `wake()` so it goes out at once. Optional: mail waits in the outbox without it. */
  mailDispatcher?: MailDispatcher
  /** The in-process SMTP sink started when SMTP_URL is unset; outside production it backs GET /api/dev/mailbox. */
  devMailbox?: SmtpSink
  /** Card payments through the Stripe SDK (to Stripe, or to a mock server); without it the purchase routes answer 503. */
  payments?: Payments
  /** Computes queued runs (here on worker threads, or through Redis on compute nodes) and streams their progress; without it runs stay queued. */
  runQueue?: RunScheduler
}
