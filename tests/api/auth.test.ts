import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import request from 'supertest'
import { createTestContext, type TestContext } from '../support/testApp.js'

let ctx: TestContext
beforeAll(async () => {
  ctx = await createTestContext()
})
afterAll(() => ctx.close())

describe('GET /api/health', () => {
  it('answers 200 { ok: true }', async () => {
    const res = await request(ctx.app).get('/api/health')
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ ok: true })
  })
})

describe('unknown API routes', () => {
  it('answer a JSON 404 in the one error shape', async () => {
    const res = await request(ctx.app).get('/api/no-such-thing')
    expect(res.status).toBe(404)
    expect(res.body.error.code).toBe('not_found')
    expect(res.body.error.message).toMatch(/no-such-thing/)
  })
})

describe('POST /api/auth/sign-in', () => {
  it('signs in a demo member and answers their firm and roles', async () => {
    const res = await ctx
      .anonymous()
      .post('/api/auth/sign-in')
      .send({ email: 'engineer@ordinate.test', password: 'ordinate-demo' })
    expect(res.status).toBe(200)
    expect(res.body.user.email).toBe('engineer@ordinate.test')
    expect(res.body.firm.name).toBe('Halvorsen Kade Structural')
    expect(res.body.roles).toEqual(['engineer'])
  })

  it('sets an HttpOnly, SameSite=Lax session cookie', async () => {
    const res = await ctx
      .anonymous()
      .post('/api/auth/sign-in')
      .send({ email: 'checker@ordinate.test', password: 'ordinate-demo' })
    const cookie = String(res.headers['set-cookie'])
    expect(cookie).toMatch(/ordinate\.sid=/)
    expect(cookie).toMatch(/HttpOnly/i)
    expect(cookie).toMatch(/SameSite=Lax/i)
    expect(cookie).not.toMatch(/Secure/i)
  })

  it('marks the cookie Secure when served over HTTPS', async () => {
    const https = await createTestContext(() => {}, { TRUST_PROXY: '1' })
    try {
      const res = await https
        .anonymous()
        .set('x-forwarded-proto', 'https')
        .post('/api/auth/sign-in')
        .send({ email: 'checker@ordinate.test', password: 'ordinate-demo' })
      expect(res.status).toBe(200)
      expect(String(res.headers['set-cookie'])).toMatch(/Secure/)
    } finally {
      https.close()
    }
  })

  describe('with a wrong password', () => {
    it('responds 401 with a message that does not say which part was wrong', async () => {
      const res = await ctx
        .anonymous()
        .post('/api/auth/sign-in')
        .send({ email: 'engineer@ordinate.test', password: 'wrong-password' })
      expect(res.status).toBe(401)
      expect(res.body.error.message).toBe('The e-mail address or password is not correct.')
    })
  })

  describe('with a malformed body', () => {
    it('responds 400 naming the field', async () => {
      const res = await ctx
        .anonymous()
        .post('/api/auth/sign-in')
        .send({ email: 'not-an-address', password: 'x' })
      expect(res.status).toBe(400)
      expect(res.body.error.code).toBe('invalid_input')
      expect(res.body.error.message).toMatch(/^email:/)
    })
  })

  it('changes the session id at sign-in (no session fixation)', async () => {
    const agent = ctx.anonymous()
    const first = await agent
      .post('/api/auth/sign-in')
      .send({ email: 'engineer@ordinate.test', password: 'ordinate-demo' })
    const second = await agent
      .post('/api/auth/sign-in')
      .send({ email: 'engineer@ordinate.test', password: 'ordinate-demo' })
    const sid = (r: request.Response) => /ordinate\.sid=([^;]+)/.exec(String(r.headers['set-cookie']))?.[1]
    expect(sid(first)).toBeTruthy()
    expect(sid(second)).toBeTruthy()
    expect(sid(second)).not.toBe(sid(first))
  })
})

describe('GET /api/me', () => {
  it('answers 401 when signed out', async () => {
    const res = await request(ctx.app).get('/api/me')
    expect(res.status).toBe(401)
  })

  it('answers the session shape when signed in', async () => {
    const agent = await ctx.signIn('admin@ordinate.test')
    const res = await agent.get('/api/me')
    expect(res.status).toBe(200)
    expect(res.body.roles).toEqual(['admin'])
  })
})

describe('POST /api/auth/sign-out', () => {
  it('answers 204 and ends the session', async () => {
    const agent = await ctx.signIn('engineer@ordinate.test')
    expect((await agent.post('/api/auth/sign-out')).status).toBe(204)
    expect((await agent.get('/api/me')).status).toBe(401)
  })
})

describe('CSRF protection on state-changing requests', () => {
  it('refuses a POST from a foreign origin with 403', async () => {
    const res = await request(ctx.app)
      .post('/api/auth/sign-in')
      .set('Origin', 'https://evil.example')
      .send({ email: 'engineer@ordinate.test', password: 'ordinate-demo' })
    expect(res.status).toBe(403)
  })

  it('refuses a POST with neither Origin, Referer nor the client header', async () => {
    const res = await request(ctx.app)
      .post('/api/auth/sign-in')
      .send({ email: 'engineer@ordinate.test', password: 'ordinate-demo' })
    expect(res.status).toBe(403)
  })

  it('accepts a same-origin POST', async () => {
    const res = await request(ctx.app)
      .post('/api/auth/sign-in')
      .set('Host', 'ordinate.example')
      .set('Origin', 'http://ordinate.example')
      .send({ email: 'engineer@ordinate.test', password: 'ordinate-demo' })
    expect(res.status).toBe(200)
  })
})
