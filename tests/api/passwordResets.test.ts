import { eq } from 'drizzle-orm'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import { mailOutbox, passwordResets, users } from '../../server/db/schema.js'
import { auditRows, latestMailTo, tokenFromLink } from '../support/mailbox.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
beforeEach(async () => {
  ctx = await createTestContext()
})
afterEach(() => ctx.close())

const ENGINEER = 'engineer@ordinate.test'
const NEW_PASSWORD = 'tidewater-annex-2031'

async function requestReset(email = ENGINEER): Promise<string> {
  const res = await ctx.anonymous().post('/api/auth/password-reset').send({ email })
  expect(res.status).toBe(202)
  return tokenFromLink(latestMailTo(ctx.db, email)!.textBody, '/reset-password/')
}

const signIn = (email: string, password: string) =>
  ctx.anonymous().post('/api/auth/sign-in').send({ email, password })

describe('POST /api/auth/password-reset', () => {
  it('answers 202 and queues a reset link for a member', async () => {
    const res = await ctx
      .anonymous()
      .post('/api/auth/password-reset')
      .send({ email: ' Engineer@Ordinate.test' })
    expect(res.status).toBe(202)
    const mail = latestMailTo(ctx.db, ENGINEER)!
    expect(mail.subject).toBe('Reset your Ordinate password')
    expect(mail.textBody).toMatch(/Hello Ines Marlowe/)
    const token = tokenFromLink(mail.textBody, '/reset-password/')
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/)
    const row = ctx.db.select().from(passwordResets).get()!
    expect(row.tokenHash).not.toBe(token)
    expect(row.expiresAt - row.createdAt).toBe(60 * 60 * 1000)
    expect(auditRows(ctx.db, 'auth.password_reset_requested')).toHaveLength(1)
  })

  it('answers exactly the same for an unknown address, and queues nothing', async () => {
    const known = await ctx.anonymous().post('/api/auth/password-reset').send({ email: ENGINEER })
    const unknown = await ctx
      .anonymous()
      .post('/api/auth/password-reset')
      .send({ email: 'nobody@ordinate.test' })
    expect(unknown.status).toBe(202)
    expect(unknown.body).toEqual(known.body)
    expect(
      ctx.db
        .select()
        .from(mailOutbox)
        .all()
        .map((m) => m.toAddress),
    ).toEqual([ENGINEER])
  })

  it.each([
    ['a malformed address', { email: 'engineer' }, /^email: Enter a valid e-mail address/],
    ['an unknown field', { email: ENGINEER, password: 'x' }, /password/],
  ])('responds 400 for %s', async (_what, body, message) => {
    const res = await ctx.anonymous().post('/api/auth/password-reset').send(body)
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(message)
  })
})

describe('POST /api/auth/password-reset/:token', () => {
  it('sets the new password, answers 204 and signs the member out everywhere', async () => {
    const session = await ctx.signIn(ENGINEER)
    const token = await requestReset()
    const res = await ctx
      .anonymous()
      .post(`/api/auth/password-reset/${token}`)
      .send({ password: NEW_PASSWORD })
    expect(res.status).toBe(204)
    expect((await session.get('/api/me')).status).toBe(401)
    expect((await signIn(ENGINEER, 'ordinate-demo')).status).toBe(401)
    expect((await signIn(ENGINEER, NEW_PASSWORD)).status).toBe(200)
    const user = ctx.db.select().from(users).where(eq(users.email, ENGINEER)).get()!
    expect(user.passwordHash).toMatch(/^\$2[aby]\$12\$/)
    expect(auditRows(ctx.db, 'auth.password_reset')).toHaveLength(1)
  })

  it('works only once: a second use answers 410 reset_used', async () => {
    const token = await requestReset()
    await ctx
      .anonymous()
      .post(`/api/auth/password-reset/${token}`)
      .send({ password: NEW_PASSWORD })
      .expect(204)
    const again = await ctx
      .anonymous()
      .post(`/api/auth/password-reset/${token}`)
      .send({ password: 'another-password-99' })
    expect(again.status).toBe(410)
    expect(again.body.error.code).toBe('reset_used')
    expect((await signIn(ENGINEER, NEW_PASSWORD)).status).toBe(200)
  })

  it('spends the other outstanding links of the same member too', async () => {
    const older = await requestReset()
    const newer = await requestReset()
    await ctx
      .anonymous()
      .post(`/api/auth/password-reset/${newer}`)
      .send({ password: NEW_PASSWORD })
      .expect(204)
    expect(
      (
        await ctx
          .anonymous()
          .post(`/api/auth/password-reset/${older}`)
          .send({ password: 'another-password-99' })
      ).status,
    ).toBe(410)
  })

  it('answers 410 reset_expired after an hour and keeps the old password', async () => {
    const token = await requestReset()
    ctx.db
      .update(passwordResets)
      .set({ expiresAt: Date.now() - 1 })
      .run()
    const res = await ctx
      .anonymous()
      .post(`/api/auth/password-reset/${token}`)
      .send({ password: NEW_PASSWORD })
    expect(res.status).toBe(410)
    expect(res.body.error.code).toBe('reset_expired')
    expect((await signIn(ENGINEER, 'ordinate-demo')).status).toBe(200)
  })

  it('answers 404 for a token nobody issued', async () => {
    const res = await ctx
      .anonymous()
      .post(`/api/auth/password-reset/${'C'.repeat(43)}`)
      .send({ password: NEW_PASSWORD })
    expect(res.status).toBe(404)
  })

  it('answers 400 for a password under 10 characters and leaves the link usable', async () => {
    const token = await requestReset()
    const res = await ctx
      .anonymous()
      .post(`/api/auth/password-reset/${token}`)
      .send({ password: '123456789' })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/^password: Use at least 10 characters/)
    expect(
      (await ctx.anonymous().post(`/api/auth/password-reset/${token}`).send({ password: NEW_PASSWORD }))
        .status,
    ).toBe(204)
  })

  it('is spent when the member leaves the firm', async () => {
    const token = await requestReset('checker@ordinate.test')
    const admin = await ctx.signIn('admin@ordinate.test')
    const members = (await admin.get('/api/firm/members')).body.items as { id: string; email: string }[]
    await admin
      .delete(`/api/firm/members/${members.find((m) => m.email === 'checker@ordinate.test')!.id}`)
      .expect(204)
    expect(
      (await ctx.anonymous().post(`/api/auth/password-reset/${token}`).send({ password: NEW_PASSWORD }))
        .status,
    ).toBe(410)
  })
})
