import { isIP } from 'node:net'
import { Router } from 'express'
import { notFound } from '../httpError.js'
import type { SmtpSink } from '../mail/smtpSink.js'

/** True for 127.0.0.0/8, ::1 and IPv4-mapped loopback: the socket's own address, never a forwarded one. */
export function isLoopback(address: string | undefined): boolean {
  if (!address || !isIP(address)) return false
  const v4 = address.startsWith('::ffff:') ? address.slice(7) : address
  return v4.startsWith('127.') || address === '::1'
}

/**
 * GET /api/dev/mailbox: the mail caught by the local SMTP sink, newest first. Mounted only
 * outside production and only while the sink runs; it answers loopback clients only, because
 * it holds live invitation and reset links.
 */
export function devMailboxRouter(sink: SmtpSink) {
  const router = Router()
  router.get('/dev/mailbox', (req, res) => {
    if (!isLoopback(req.socket.remoteAddress)) throw notFound('The API route GET /api/dev/mailbox')
    res.json({ items: sink.messages() })
  })
  return router
}
