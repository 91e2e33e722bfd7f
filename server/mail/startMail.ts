import type { Config } from '../config.js'
import type { Db } from '../db/client.js'
import { MailDispatcher, createMailTransport } from '../services/mail.js'
import { SmtpSink } from './smtpSink.js'

export interface MailServices {
  mailDispatcher: MailDispatcher
  /** Present when SMTP_URL is unset: the local sink that receives the mail instead. */
  devMailbox?: SmtpSink
  stop(): Promise<void>
}

/**
 * Starts mail delivery for `npm start`: the outbox dispatcher over SMTP_URL, or, when SMTP_URL
 * is unset, over a local in-process SMTP sink whose messages the development mailbox shows.
 */
export async function startMail(db: Db, config: Config, log: (line: string) => void): Promise<MailServices> {
  const devMailbox = config.smtpUrl ? undefined : await SmtpSink.start()
  if (devMailbox) {
    log(
      config.env === 'production'
        ? `SMTP_URL is not set: mail goes to a local sink on port ${devMailbox.port} and is not delivered.`
        : `SMTP_URL is not set: mail goes to a local sink; read it at /dev/mailbox.`,
    )
  }
  if (config.env === 'production' && !config.publicUrl) {
    log('PUBLIC_URL is not set: links in mail will use the Host header of each request.')
  }
  const mailDispatcher = new MailDispatcher({
    db,
    transport: createMailTransport(config.smtpUrl ?? devMailbox!.url),
    from: config.mailFrom,
    log,
  })
  mailDispatcher.start()
  return {
    mailDispatcher,
    devMailbox,
    async stop() {
      await mailDispatcher.stop()
      await devMailbox?.close()
    },
  }
}
