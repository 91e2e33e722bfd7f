import { afterEach, describe, expect, it } from 'vitest'
import { createPayments, type Payments } from './payments.js'

let opened: Payments | undefined
afterEach(async () => {
  await opened?.close()
  opened = undefined
})

describe('createPayments', () => {
  it('starts stripe-stateful-mock in-process on loopback when no STRIPE_* setting is given, in test mode', async () => {
    opened = await createPayments({})
    expect(opened.mode).toBe('test')
    expect(opened.cardEntry).toBe('test-tokens')
    expect(opened.endpoint).toMatch(/^in-process Stripe mock at http:\/\/127\.0\.0\.1:\d+$/)
    const outcome = await opened.charge({
      amountCents: 4000,
      currency: 'usd',
      cardToken: 'tok_visa',
      idempotencyKey: `unit-${Date.now()}`,
      description: 'unit test',
      metadata: {},
    })
    expect(outcome).toMatchObject({ status: 'succeeded', amountCents: 4000, currency: 'usd' })
  })

  it('talks to Stripe itself with a live key and no STRIPE_API_HOST: live mode, card entry by Stripe.js', async () => {
    opened = await createPayments({ secretKey: 'sk_live_notarealkey', publishableKey: 'pk_live_notarealkey' })
    expect(opened.mode).toBe('live')
    expect(opened.cardEntry).toBe('stripe-js')
    expect(opened.publicConfig()).toEqual({
      mode: 'live',
      cardEntry: 'stripe-js',
      publishableKey: 'pk_live_notarealkey',
      testCards: [],
    })
  })

  it('treats a Stripe test key as test mode, still with card entry by Stripe.js', async () => {
    opened = await createPayments({ secretKey: 'sk_test_notarealkey' })
    expect(opened.mode).toBe('test')
    expect(opened.cardEntry).toBe('stripe-js')
  })

  it('points the SDK at STRIPE_API_HOST, defaulting the port from the protocol', async () => {
    opened = await createPayments({ host: 'stripe-mock.internal', protocol: 'http' })
    expect(opened.endpoint).toBe('Stripe-compatible server at http://stripe-mock.internal:80')
    expect(opened.publicConfig().testCards.length).toBeGreaterThan(0)
  })
})
