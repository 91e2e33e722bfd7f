import type { AddressInfo } from 'node:net'
import { simpleParser } from 'mailparser'
import { SMTPServer } from 'smtp-server'
import type { SinkMessage } from '../../shared/schemas/devMailbox.js'
import { newId } from '../ids.js'

const LINK = /https?:\/\/[^\s<>"]+/g

/**
 * A local SMTP server that accepts every message on a loopback port and keeps it in memory,
 * so mail can be read on a machine with no mail server (the development mailbox).
 * No TLS and no authentication: it listens on 127.0.0.1 only.
 */
export class SmtpSink {
  private readonly received: SinkMessage[] = []
  private readonly waiters = new Set<() => void>()

  private constructor(
    private readonly server: SMTPServer,
    readonly port: number,
    private readonly capacity: number,
  ) {}

  /** Starts the sink; `port: 0` (the default) picks a free port. */
  static start(options: { port?: number; capacity?: number } = {}): Promise<SmtpSink> {
    let sink: SmtpSink | undefined
    const server = new SMTPServer({
      authOptional: true,
      disabledCommands: ['AUTH', 'STARTTLS'],
      logger: false,
      size: 2 * 1024 * 1024,
      closeTimeout: 1000,
      onData(stream, session, callback) {
        simpleParser(stream)
          .then((mail) => {
            const to = session.envelope.rcptTo.map((r) => r.address)
            const text = mail.text ?? ''
            sink?.keep({
              id: newId(),
              receivedAt: Date.now(),
              from: mail.from?.text ?? (session.envelope.mailFrom ? session.envelope.mailFrom.address : ''),
              to,
              subject: mail.subject ?? '',
              text,
              links: text.match(LINK) ?? [],
            })
            callback()
          })
          .catch((err: unknown) => callback(err instanceof Error ? err : new Error(String(err))))
      },
    })
    return new Promise((resolve, reject) => {
      server.on('error', reject)
      server.listen(options.port ?? 0, '127.0.0.1', () => {
        server.removeListener('error', reject)
        const { port } = server.server.address() as AddressInfo
        sink = new SmtpSink(server, port, options.capacity ?? 200)
        resolve(sink)
      })
    })
  }

  /** The URL to give nodemailer (and SMTP_URL) to send into this sink. */
  get url(): string {
    return `smtp://127.0.0.1:${this.port}`
  }

  /** What was received, newest first. */
  messages(): SinkMessage[] {
    return [...this.received].reverse()
  }

  /** Resolves with the newest message matching `match`, waiting for it up to `timeoutMs`. */
  waitFor(match: (m: SinkMessage) => boolean, timeoutMs = 5000): Promise<SinkMessage> {
    return new Promise((resolve, reject) => {
      const check = () => {
        const found = this.messages().find(match)
        if (!found) return false
        this.waiters.delete(check)
        clearTimeout(timer)
        resolve(found)
        return true
      }
      const timer = setTimeout(() => {
        this.waiters.delete(check)
        reject(new Error(`No matching message reached the SMTP sink within ${timeoutMs} ms.`))
      }, timeoutMs)
      if (!check()) this.waiters.add(check)
    })
  }

  close(): Promise<void> {
    return new Promise((resolve) => this.server.close(() => resolve()))
  }

  private keep(message: SinkMessage): void {
    this.received.push(message)
    if (this.received.length > this.capacity) this.received.shift()
    for (const check of [...this.waiters]) check()
  }
}
