import { eq } from 'drizzle-orm'
import { afterEach, describe, expect, it } from 'vitest'
import request from 'supertest'
import { mailOutbox } from '../../server/db/schema.js'
import { SmtpSink } from '../../server/mail/smtpSink.js'
import { isLoopback } from '../../server/routes/devMailbox.js'
import { escapeHtml, invitationMail, passwordResetMail } from '../../server/mail/templates.js'
import {
  MailDispatcher,
  createMailTransport,
  defaultBackoffMs,
  enqueueMail,
} from '../../server/services/mail.js'
import { sinkMessageListSchema } from '../../shared/schemas/devMailbox.js'
import { closedPort } from '../support/closedPort.js'
import { tokenFromLink } from '../support/mailbox.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

const cleanups: (() => unknown)[] = []
afterEach(async () => {
  for (const clean of cleanups.splice(0).reverse()) await clean()
})

async function context(
  extend?: Parameters<typeof createTestContext>[0],
  env?: NodeJS.ProcessEnv,
): Promise<TestContext> {
  const ctx = await createTestContext(extend, env)
  cleanups.push(() => ctx.close())
  return ctx
}

async function sink(port?: number): Promise<SmtpSink> {
  const s = await SmtpSink.start({ port })
  cleanups.push(() => s.close())
  return s
}

function dispatcher(
  ctx: TestContext,
  smtpUrl: string,
  now?: () => number,
  maxAttempts?: number,
): MailDispatcher {
  const d = new MailDispatcher({
    db: ctx.db,
    transport: createMailTransport(smtpUrl),
    from: 'Ordinate <no-reply@ordinate.test>',
    now,
    maxAttempts,
  })
  cleanups.push(() => d.stop())
  return d
}

const outboxRow = (ctx: TestContext, id: string) =>
  ctx.db.select().from(mailOutbox).where(eq(mailOutbox.id, id)).get()!
const sample = {
  to: 'someone@ordinate.test',
  subject: 'Test message',
  text: 'Plain text body.\n',
  html: '<p>HTML body.</p>',
}

describe('enqueueMail', () => {
  it('writes a queued row due now and sends nothing', async () => {
    const ctx = await context()
    const id = enqueueMail(ctx.db, sample)
    const row = outboxRow(ctx, id)
    expect(row).toMatchObject({
      toAddress: sample.to,
      subject: sample.subject,
      status: 'queued',
      attempts: 0,
      sentAt: null,
    })
    expect(row.nextAttemptAt).toBeLessThanOrEqual(Date.now())
  })
})

describe('MailDispatcher', () => {
  it('delivers queued mail over SMTP to the sink and marks it sent', async () => {
    const ctx = await context()
    const s = await sink()
    const id = enqueueMail(ctx.db, sample)
    expect(await dispatcher(ctx, s.url).dispatchOnce()).toEqual({ sent: 1, retried: 0, failed: 0 })
    const [received] = s.messages()
    expect(received).toMatchObject({
      to: ['someone@ordinate.test'],
      subject: 'Test message',
      text: 'Plain text body.\n',
    })
    expect(received?.from).toMatch(/no-reply@ordinate\.test/)
    expect(outboxRow(ctx, id)).toMatchObject({ status: 'sent', attempts: 1, lastError: null })
    expect(await dispatcher(ctx, s.url).dispatchOnce()).toEqual({ sent: 0, retried: 0, failed: 0 })
  })

  it('keeps mail queued with a backoff when SMTP is down, then sends it once the server is up', async () => {
    const port = await closedPort()
    let clock = 0
    const ctx = await context()
    const d = dispatcher(ctx, `smtp://127.0.0.1:${port}`, () => clock)
    const admin = await ctx.signIn('admin@ordinate.test')
    const invited = await admin
      .post('/api/firm/invitations')
      .send({ email: 'later@ordinate.test', roles: ['checker'] })
    expect(invited.status).toBe(201)

    clock = Date.now()
    expect(await d.dispatchOnce()).toEqual({ sent: 0, retried: 1, failed: 0 })
    const [row] = ctx.db.select().from(mailOutbox).all()
    expect(row).toMatchObject({ status: 'queued', attempts: 1 })
    expect(row?.lastError).toMatch(/ECONNREFUSED|connect/i)
    expect(row?.nextAttemptAt).toBe(clock + defaultBackoffMs(1))

    const s = await sink(port)
    expect(await d.dispatchOnce()).toEqual({ sent: 0, retried: 0, failed: 0 })
    clock += defaultBackoffMs(1)
    expect(await d.dispatchOnce()).toEqual({ sent: 1, retried: 0, failed: 0 })
    expect(s.messages()[0]?.to).toEqual(['later@ordinate.test'])
    expect(ctx.db.select().from(mailOutbox).get()).toMatchObject({ status: 'sent', attempts: 2 })
  })

  it('gives up after maxAttempts and marks the message failed', async () => {
    const port = await closedPort()
    let clock = 0
    const ctx = await context()
    const d = dispatcher(ctx, `smtp://127.0.0.1:${port}`, () => clock, 2)
    const id = enqueueMail(ctx.db, sample)
    clock = Date.now()
    expect((await d.dispatchOnce()).retried).toBe(1)
    clock += defaultBackoffMs(1)
    expect((await d.dispatchOnce()).failed).toBe(1)
    expect(outboxRow(ctx, id)).toMatchObject({ status: 'failed', attempts: 2 })
    clock += 24 * 60 * 60 * 1000
    expect(await d.dispatchOnce()).toEqual({ sent: 0, retried: 0, failed: 0 })
  })

  it('backs off 30 s, 60 s, 120 s … up to one hour', () => {
    expect([1, 2, 3, 4].map(defaultBackoffMs)).toEqual([30_000, 60_000, 120_000, 240_000])
    expect(defaultBackoffMs(20)).toBe(3_600_000)
  })

  it('sends by itself once started and woken, and stops cleanly', async () => {
    const ctx = await context()
    const s = await sink()
    const d = dispatcher(ctx, s.url)
    d.start()
    enqueueMail(ctx.db, { ...sample, subject: 'Woken' })
    d.wake()
    expect((await s.waitFor((m) => m.subject === 'Woken')).to).toEqual([sample.to])
    await d.stop()
  })
})

describe('mail content', () => {
  const hostile = '<script>alert("x")</script> & Co'

  it('escapes every interpolated value in the HTML part', () => {
    const mail = invitationMail({
      firmName: hostile,
      inviterName: `Eve "the" O'Hara`,
      roles: ['engineer'],
      url: 'http://127.0.0.1:3000/invitations/abc?x=1&y="2"',
      expiresAt: Date.UTC(2031, 0, 2, 3, 4),
    })
    expect(mail.html).not.toContain('<script>')
    expect(mail.html).toContain(escapeHtml(hostile))
    expect(mail.html).toContain('Eve &quot;the&quot; O&#39;Hara')
    expect(mail.html).toContain('href="http://127.0.0.1:3000/invitations/abc?x=1&amp;y=&quot;2&quot;"')
    expect(mail.text).toContain(hostile)
    expect(mail.text).toContain('2031-01-02 03:04 UTC')
  })

  it('names the product, and carries no images, remote resources or tracking', () => {
    for (const mail of [
      invitationMail({
        firmName: 'F',
        inviterName: 'I',
        roles: ['admin'],
        url: 'http://h/invitations/t',
        expiresAt: 0,
      }),
      passwordResetMail({ name: 'N', url: 'http://h/reset-password/t', expiresAt: 0 }),
    ]) {
      expect(mail.subject).toMatch(/Ordinate/)
      expect(mail.text).toMatch(/Ordinate/)
      expect(mail.html).toMatch(/Ordinate/)
      expect(mail.html).not.toMatch(/<img|<link|<script|url\(|utm_/i)
      expect(mail.html.match(/href="/g)).toHaveLength(1)
    }
  })

  it('escapes the five HTML-significant characters', () => {
    expect(escapeHtml(`<a href="x">'&'</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;')
  })
})

describe('GET /api/dev/mailbox', () => {
  it('is not there without a sink', async () => {
    const ctx = await context()
    expect((await request(ctx.app).get('/api/dev/mailbox')).status).toBe(404)
  })

  it('answers loopback clients only, judged by the socket address', () => {
    expect(['127.0.0.1', '127.8.9.10', '::1', '::ffff:127.0.0.1'].map(isLoopback)).toEqual([
      true,
      true,
      true,
      true,
    ])
    expect(['10.0.0.2', '192.168.1.5', '::ffff:10.1.2.3', 'fe80::1', '', undefined].map(isLoopback)).toEqual([
      false,
      false,
      false,
      false,
      false,
      false,
    ])
  })

  it('is not there in production, even with a sink', async () => {
    const s = await sink()
    const ctx = await context(
      (deps) => {
        deps.devMailbox = s
      },
      { NODE_ENV: 'production', DEMO_DATA: '1' },
    )
    expect((await request(ctx.app).get('/api/dev/mailbox')).status).toBe(404)
  })

  it('carries an invitation from the API through SMTP to the mailbox, and its link signs the invitee in', async () => {
    const s = await sink()
    const ctx = await context((deps) => {
      deps.devMailbox = s
    })
    const d = dispatcher(ctx, s.url)
    const admin = await ctx.signIn('admin@ordinate.test')
    await admin
      .post('/api/firm/invitations')
      .send({ email: 'fresh@ordinate.test', roles: ['engineer'] })
      .expect(201)
    expect((await d.dispatchOnce()).sent).toBe(1)

    const res = await request(ctx.app).get('/api/dev/mailbox')
    expect(res.status).toBe(200)
    const [message] = sinkMessageListSchema.parse(res.body).items
    expect(message?.to).toEqual(['fresh@ordinate.test'])
    expect(message?.subject).toMatch(/invited you to Halvorsen Kade Structural on Ordinate/)
    const link = message?.links.find((l) => l.includes('/invitations/'))
    expect(link).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/invitations\/[A-Za-z0-9_-]{43}$/)

    const token = tokenFromLink(link!, '/invitations/')
    const invitee = ctx.anonymous()
    expect((await invitee.get(`/api/invitations/${token}`)).body.email).toBe('fresh@ordinate.test')
    await invitee
      .post(`/api/invitations/${token}/accept`)
      .send({ name: 'Fresh Face', password: 'fresh-face-password' })
      .expect(201)
    expect((await invitee.get('/api/me')).body.user.email).toBe('fresh@ordinate.test')
  })

  it('carries a password reset link that works once', async () => {
    const s = await sink()
    const ctx = await context((deps) => {
      deps.devMailbox = s
    })
    const d = dispatcher(ctx, s.url)
    await ctx
      .anonymous()
      .post('/api/auth/password-reset')
      .send({ email: 'checker@ordinate.test' })
      .expect(202)
    await d.dispatchOnce()
    const message = await s.waitFor((m) => m.to.includes('checker@ordinate.test'))
    const token = tokenFromLink(message.text, '/reset-password/')
    await ctx
      .anonymous()
      .post(`/api/auth/password-reset/${token}`)
      .send({ password: 'checker-new-pass' })
      .expect(204)
    await ctx
      .anonymous()
      .post(`/api/auth/password-reset/${token}`)
      .send({ password: 'checker-new-pass' })
      .expect(410)
  })
})
