import { createHash } from 'node:crypto'
import { eq } from 'drizzle-orm'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import request from 'supertest'
import { invitations, memberships, users } from '../../server/db/schema.js'
import {
  invitationListSchema,
  invitationPreviewSchema,
  invitationSchema,
} from '../../shared/schemas/invitations.js'
import { sessionInfoSchema } from '../../shared/schemas/accounts.js'
import { auditRows, latestMailTo, tokenFromLink } from '../support/mailbox.js'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
beforeEach(async () => {
  ctx = await createTestContext()
})
afterEach(() => ctx.close())

const NEWCOMER = 'newcomer@ordinate.test'

/** Invites an address as the demo admin and returns the token from the queued mail. */
async function invite(email = NEWCOMER, roles: string[] = ['engineer']) {
  const admin = await ctx.signIn('admin@ordinate.test')
  const res = await admin.post('/api/firm/invitations').send({ email, roles })
  expect(res.status).toBe(201)
  const mail = latestMailTo(ctx.db, email)
  if (!mail) throw new Error('no invitation mail queued')
  return {
    admin,
    invitation: invitationSchema.parse(res.body),
    token: tokenFromLink(mail.textBody, '/invitations/'),
  }
}

/** An invitation whose 72 hours have run out; answers its token. */
async function expiredInvitation(): Promise<string> {
  const { invitation, token } = await invite()
  ctx.db
    .update(invitations)
    .set({ expiresAt: Date.now() - 1 })
    .where(eq(invitations.id, invitation.id))
    .run()
  return token
}

const sid = (r: request.Response) => /ordinate\.sid=([^;]+)/.exec(String(r.headers['set-cookie']))?.[1]

describe('POST /api/firm/invitations', () => {
  it('records the invitation, queues a mail with the link and answers 201 without the token', async () => {
    const { invitation, token } = await invite(NEWCOMER, ['checker', 'engineer'])
    expect(invitation.email).toBe(NEWCOMER)
    expect(invitation.roles).toEqual(['engineer', 'checker'])
    expect(invitation.invitedByName).toBe('Ruth Okonkwo-Baines')
    expect(invitation.expiresAt - invitation.createdAt).toBe(72 * 60 * 60 * 1000)
    expect(JSON.stringify(invitation)).not.toContain(token)
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/)

    const mail = latestMailTo(ctx.db, NEWCOMER)!
    expect(mail.status).toBe('queued')
    expect(mail.subject).toBe('Ruth Okonkwo-Baines invited you to Halvorsen Kade Structural on Ordinate')
    expect(mail.textBody).toMatch(/as engineer and checker/)
    expect(mail.htmlBody).toContain(`/invitations/${token}`)
    expect(auditRows(ctx.db, 'invitation.created', invitation.id)).toHaveLength(1)
  })

  it('stores only the SHA-256 hash of the token', async () => {
    const { invitation, token } = await invite()
    const row = ctx.db.select().from(invitations).where(eq(invitations.id, invitation.id)).get()!
    expect(row.tokenHash).toBe(createHash('sha256').update(token).digest('hex'))
    expect(JSON.stringify(row)).not.toContain(token)
  })

  it('normalises the address to lower case', async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    const res = await admin
      .post('/api/firm/invitations')
      .send({ email: '  New.Person@Ordinate.TEST ', roles: ['engineer'] })
    expect(res.status).toBe(201)
    expect(res.body.email).toBe('new.person@ordinate.test')
  })

  it('links to PUBLIC_URL when it is set', async () => {
    ctx.close()
    ctx = await createTestContext(() => {}, { PUBLIC_URL: 'https://ordinate.example.org' })
    const { token } = await invite()
    expect(latestMailTo(ctx.db, NEWCOMER)!.textBody).toContain(
      `https://ordinate.example.org/invitations/${token}`,
    )
  })

  describe('with bad input', () => {
    it.each([
      [
        'a malformed address',
        { email: 'nobody', roles: ['engineer'] },
        /^email: Enter a valid e-mail address/,
      ],
      ['no roles', { email: NEWCOMER, roles: [] }, /^roles: Choose at least one role/],
      ['an unknown role', { email: NEWCOMER, roles: ['owner'] }, /^roles\.0:/],
      ['an unknown field', { email: NEWCOMER, roles: ['engineer'], firmId: 'x' }, /firmId/],
    ])('responds 400 for %s and queues nothing', async (_what, body, message) => {
      const admin = await ctx.signIn('admin@ordinate.test')
      const res = await admin.post('/api/firm/invitations').send(body)
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(message)
      expect(latestMailTo(ctx.db, NEWCOMER)).toBeUndefined()
    })
  })

  it('answers 409 for an address that is already a member of the firm', async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    const res = await admin
      .post('/api/firm/invitations')
      .send({ email: 'checker@ordinate.test', roles: ['engineer'] })
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('already_member')
    expect(res.body.error.message).toMatch(/already a member of this firm/)
  })

  it('answers 409 for an address with an account at another firm', async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    const res = await admin
      .post('/api/firm/invitations')
      .send({ email: 'outsider@ordinate.test', roles: ['engineer'] })
    expect(res.status).toBe(409)
    expect(res.body.error.message).toMatch(/another firm/)
  })

  it('supersedes an earlier pending invitation of the same address', async () => {
    const first = await invite()
    const second = await invite()
    expect((await request(ctx.app).get(`/api/invitations/${first.token}`)).status).toBe(410)
    expect((await request(ctx.app).get(`/api/invitations/${second.token}`)).status).toBe(200)
    const { items } = invitationListSchema.parse((await second.admin.get('/api/firm/invitations')).body)
    expect(items.map((i) => i.id)).toEqual([second.invitation.id])
  })

  it('refuses non-admins with 403 naming the admin role', async () => {
    const engineer = await ctx.signIn('engineer@ordinate.test')
    const res = await engineer.post('/api/firm/invitations').send({ email: NEWCOMER, roles: ['engineer'] })
    expect(res.status).toBe(403)
    expect(res.body.error.message).toMatch(/admin role/)
  })

  it('answers 401 when signed out', async () => {
    const res = await ctx
      .anonymous()
      .post('/api/firm/invitations')
      .send({ email: NEWCOMER, roles: ['engineer'] })
    expect(res.status).toBe(401)
  })
})

describe('GET and DELETE /api/firm/invitations', () => {
  it("lists only the firm's pending invitations", async () => {
    const { admin, invitation } = await invite()
    ctx.db
      .update(memberships)
      .set({ roles: ['engineer', 'admin'] })
      .where(eq(memberships.userId, ctx.seed.userIds['outsider@ordinate.test']!))
      .run()
    const outsider = await ctx.signIn('outsider@ordinate.test')
    expect((await outsider.get('/api/firm/invitations')).body).toEqual({ items: [] })
    expect(invitationListSchema.parse((await admin.get('/api/firm/invitations')).body).items).toEqual([
      invitation,
    ])
    expect((await outsider.delete(`/api/firm/invitations/${invitation.id}`)).status).toBe(404)
  })

  it('revokes an invitation so its link stops working', async () => {
    const { admin, invitation, token } = await invite()
    expect((await admin.delete(`/api/firm/invitations/${invitation.id}`)).status).toBe(204)
    expect((await request(ctx.app).get(`/api/invitations/${token}`)).status).toBe(410)
    expect((await admin.delete(`/api/firm/invitations/${invitation.id}`)).status).toBe(404)
    expect(auditRows(ctx.db, 'invitation.revoked', invitation.id)).toHaveLength(1)
  })

  it('refuses non-admins with 403', async () => {
    const checker = await ctx.signIn('checker@ordinate.test')
    expect((await checker.get('/api/firm/invitations')).status).toBe(403)
  })
})

describe('GET /api/invitations/:token', () => {
  it('shows the invitation to anyone holding the link', async () => {
    const { token } = await invite(NEWCOMER, ['checker'])
    const res = await request(ctx.app).get(`/api/invitations/${token}`)
    expect(res.status).toBe(200)
    expect(invitationPreviewSchema.parse(res.body)).toMatchObject({
      email: NEWCOMER,
      firmName: 'Halvorsen Kade Structural',
      roles: ['checker'],
      invitedByName: 'Ruth Okonkwo-Baines',
    })
  })

  it('answers 404 for a token nobody issued', async () => {
    const res = await request(ctx.app).get(`/api/invitations/${'A'.repeat(43)}`)
    expect(res.status).toBe(404)
  })

  it('answers 400 for a token of the wrong shape', async () => {
    const res = await request(ctx.app).get('/api/invitations/short')
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/^token: This link is not complete/)
  })

  it('answers 410 invitation_expired after 72 hours', async () => {
    const token = await expiredInvitation()
    const res = await request(ctx.app).get(`/api/invitations/${token}`)
    expect(res.status).toBe(410)
    expect(res.body.error.code).toBe('invitation_expired')
  })
})

describe('POST /api/invitations/:token/accept', () => {
  const body = { name: 'Noor Calloway', password: 'long-enough-passphrase' }

  it('creates the member, signs them in with HttpOnly SameSite=Lax cookie and answers 201', async () => {
    const { token } = await invite(NEWCOMER, ['engineer', 'checker'])
    const agent = ctx.anonymous()
    const res = await agent.post(`/api/invitations/${token}/accept`).send(body)
    expect(res.status).toBe(201)
    const info = sessionInfoSchema.parse(res.body)
    expect(info).toMatchObject({
      user: { email: NEWCOMER, name: 'Noor Calloway' },
      firm: { name: 'Halvorsen Kade Structural' },
      roles: ['engineer', 'checker'],
    })
    const cookie = String(res.headers['set-cookie'])
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
    expect((await agent.get('/api/me')).body.user.email).toBe(NEWCOMER)
    const user = ctx.db.select().from(users).where(eq(users.email, NEWCOMER)).get()!
    expect(user.passwordHash).toMatch(/^\$2[aby]\$12\$/)
    expect(auditRows(ctx.db, 'invitation.accepted')).toHaveLength(1)
    const signIn = await ctx
      .anonymous()
      .post('/api/auth/sign-in')
      .send({ email: NEWCOMER, password: body.password })
    expect(signIn.status).toBe(200)
  })

  it('starts a fresh session id even when the browser was signed in as someone else', async () => {
    const { token } = await invite()
    const agent = ctx.anonymous()
    const before = await agent
      .post('/api/auth/sign-in')
      .send({ email: 'engineer@ordinate.test', password: 'ordinate-demo' })
    const res = await agent.post(`/api/invitations/${token}/accept`).send(body)
    expect(res.status).toBe(201)
    expect(sid(res)).toBeTruthy()
    expect(sid(res)).not.toBe(sid(before))
    expect((await agent.get('/api/me')).body.user.email).toBe(NEWCOMER)
  })

  it('works only once: a second use answers 410 invitation_used', async () => {
    const { token } = await invite()
    expect((await ctx.anonymous().post(`/api/invitations/${token}/accept`).send(body)).status).toBe(201)
    const again = await ctx
      .anonymous()
      .post(`/api/invitations/${token}/accept`)
      .send({ ...body, name: 'Someone Else' })
    expect(again.status).toBe(410)
    expect(again.body.error.code).toBe('invitation_used')
    expect(ctx.db.select().from(users).where(eq(users.email, NEWCOMER)).get()?.name).toBe('Noor Calloway')
  })

  it('answers 410 for an expired invitation and creates nobody', async () => {
    const token = await expiredInvitation()
    const res = await ctx.anonymous().post(`/api/invitations/${token}/accept`).send(body)
    expect(res.status).toBe(410)
    expect(res.body.error.code).toBe('invitation_expired')
    expect(ctx.db.select().from(users).where(eq(users.email, NEWCOMER)).get()).toBeUndefined()
  })

  describe('with bad input', () => {
    it.each([
      [
        'a password under 10 characters',
        { name: 'Noor', password: 'short-pw1' },
        /^password: Use at least 10 characters/,
      ],
      ['a blank name', { name: '   ', password: 'long-enough-passphrase' }, /^name: Enter your name/],
      ['an unknown field', { ...body, roles: ['admin'] }, /roles/],
    ])('responds 400 for %s and leaves the invitation usable', async (_what, bad, message) => {
      const { token } = await invite()
      const res = await ctx.anonymous().post(`/api/invitations/${token}/accept`).send(bad)
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(message)
      expect((await request(ctx.app).get(`/api/invitations/${token}`)).status).toBe(200)
    })
  })

  it('answers 404 for an unknown token', async () => {
    const res = await ctx
      .anonymous()
      .post(`/api/invitations/${'B'.repeat(43)}/accept`)
      .send(body)
    expect(res.status).toBe(404)
  })

  it('refuses a cross-site accept (CSRF)', async () => {
    const { token } = await invite()
    const res = await request(ctx.app)
      .post(`/api/invitations/${token}/accept`)
      .set('Origin', 'https://elsewhere.example')
      .send(body)
    expect(res.status).toBe(403)
  })

  it('lets a removed member come back through a new invitation, keeping their user row', async () => {
    const admin = await ctx.signIn('admin@ordinate.test')
    const checkerId = ctx.seed.userIds['checker@ordinate.test']!
    const membership = ctx.db.select().from(memberships).where(eq(memberships.userId, checkerId)).get()!
    await admin.delete(`/api/firm/members/${membership.id}`).expect(204)
    const { token } = await invite('checker@ordinate.test', ['checker'])
    const res = await ctx
      .anonymous()
      .post(`/api/invitations/${token}/accept`)
      .send({ name: 'Tomas Verhoek', password: 'a-brand-new-password' })
    expect(res.status).toBe(201)
    expect(res.body.user.id).toBe(checkerId)
    expect(
      (
        await ctx
          .anonymous()
          .post('/api/auth/sign-in')
          .send({ email: 'checker@ordinate.test', password: 'ordinate-demo' })
      ).status,
    ).toBe(401)
  })
})
