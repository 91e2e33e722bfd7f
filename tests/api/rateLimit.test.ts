import { afterEach, describe, expect, it } from 'vitest'
import request from 'supertest'
import { createTestContext, type TestContext } from '../support/testApp.js'

// Small limits so the tests stay fast; TRUST_PROXY lets each test pick its client address.
const ENV = {
  TRUST_PROXY: '1',
  SIGN_IN_MAX_FAILURES_PER_EMAIL: '3',
  SIGN_IN_MAX_FAILURES_PER_ADDRESS: '5',
  PASSWORD_RESET_MAX_PER_WINDOW: '3',
}

let ctx: TestContext | undefined
afterEach(() => ctx?.close())

const from = (address: string) => (ctx as TestContext).anonymous().set('x-forwarded-for', address)
const signIn = (address: string, email: string, password: string) =>
  from(address).post('/api/auth/sign-in').send({ email, password })

function expect429(res: request.Response) {
  expect(res.status).toBe(429)
  expect(res.body.error.code).toBe('rate_limited')
  expect(res.body.error.message).toMatch(/Too many attempts/)
  expect(Number(res.headers['retry-after'])).toBeGreaterThan(0)
}

describe('sign-in rate limit', () => {
  it('answers 429 per e-mail after repeated failures, even from new addresses and with the right password', async () => {
    ctx = await createTestContext(() => {}, ENV)
    for (let i = 1; i <= 3; i++) {
      expect((await signIn(`198.51.100.${i}`, 'engineer@ordinate.test', 'wrong-password')).status).toBe(401)
    }
    expect429(await signIn('198.51.100.9', 'engineer@ordinate.test', 'ordinate-demo'))
    expect429(await signIn('198.51.100.9', 'ENGINEER@ordinate.test', 'ordinate-demo'))
    expect((await signIn('198.51.100.9', 'checker@ordinate.test', 'ordinate-demo')).status).toBe(200)
  })

  it('answers 429 per address after failures spread over many e-mails', async () => {
    ctx = await createTestContext(() => {}, ENV)
    for (let i = 1; i <= 5; i++) {
      expect((await signIn('203.0.113.7', `guess${i}@ordinate.test`, 'wrong-password')).status).toBe(401)
    }
    expect429(await signIn('203.0.113.7', 'checker@ordinate.test', 'ordinate-demo'))
    expect((await signIn('203.0.113.8', 'checker@ordinate.test', 'ordinate-demo')).status).toBe(200)
  })

  it('counts failures only: successful sign-ins never use up the allowance', async () => {
    ctx = await createTestContext(() => {}, ENV)
    for (let i = 0; i < 6; i++) {
      expect((await signIn('203.0.113.20', 'admin@ordinate.test', 'ordinate-demo')).status).toBe(200)
    }
    expect((await signIn('203.0.113.20', 'admin@ordinate.test', 'wrong-password')).status).toBe(401)
  })

  it('uses the defaults from the environment schema when nothing is set', async () => {
    ctx = await createTestContext()
    expect(ctx.deps.config.rateLimits).toEqual({
      windowMs: 900_000,
      signInFailuresPerEmail: 5,
      signInFailuresPerAddress: 20,
      passwordResetsPerWindow: 5,
    })
  })
})

describe('password-reset rate limit', () => {
  const ask = (address: string, email: string) =>
    from(address).post('/api/auth/password-reset').send({ email })

  it('limits an address with an account and one without in exactly the same way', async () => {
    ctx = await createTestContext(() => {}, ENV)
    for (const [address, email] of [
      ['192.0.2.1', 'engineer@ordinate.test'],
      ['192.0.2.2', 'nobody@ordinate.test'],
    ] as const) {
      for (let i = 0; i < 3; i++) expect((await ask(address, email)).status).toBe(202)
      expect429(await ask(address, email))
    }
  })

  it('limits one e-mail asked for from many client addresses', async () => {
    ctx = await createTestContext(() => {}, ENV)
    for (let i = 1; i <= 3; i++)
      expect((await ask(`192.0.2.${10 + i}`, 'checker@ordinate.test')).status).toBe(202)
    expect429(await ask('192.0.2.99', 'checker@ordinate.test'))
  })

  it('limits one client address asking for many e-mails', async () => {
    ctx = await createTestContext(() => {}, ENV)
    for (let i = 1; i <= 3; i++)
      expect((await ask('192.0.2.50', `person${i}@ordinate.test`)).status).toBe(202)
    expect429(await ask('192.0.2.50', 'person4@ordinate.test'))
  })
})
