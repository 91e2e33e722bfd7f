import { setTimeout as sleep } from 'node:timers/promises'
import Stripe from 'stripe'
import type { PaymentsConfig, TestCard } from '../../shared/schemas/credits.js'
import type { Config } from '../config.js'
import { startStripeMock, type StripeMockServer } from './stripeMock.js'

/** The key the SDK sends to a mock server; stripe-stateful-mock accepts any `sk_test_…` key. */
const MOCK_SECRET_KEY = 'sk_test_ordinate_local_mock'

/**
 * The test tokens the card form offers when card details cannot come from Stripe.js. The first
 * two are Stripe's own test tokens; the chained one and tok_500 are stripe-stateful-mock's extras
 * (a chain answers each call with its next token, so `tok_429|tok_visa|<random>` answers 429 once
 * and then succeeds; the client appends the random part once per attempt).
 */
const MOCK_TEST_CARDS: TestCard[] = [
  { token: 'tok_visa', label: 'test card: succeeds', chained: false },
  {
    token: 'tok_chargeDeclinedInsufficientFunds',
    label: 'test card: declined (insufficient funds)',
    chained: false,
  },
  { token: 'tok_429|tok_visa', label: 'test card: rate-limited once, then succeeds', chained: true },
  { token: 'tok_500', label: 'test card: payment server error', chained: false },
]

export interface ChargeRequest {
  amountCents: number
  currency: string
  /** A card token: from Stripe.js in live use, one of the test tokens otherwise. */
  cardToken: string
  /** Derived from the client's purchase id, so a repeated request can never charge twice. */
  idempotencyKey: string
  description: string
  metadata: Record<string, string>
}

export type ChargeOutcome =
  | { status: 'succeeded'; chargeId: string; amountCents: number; currency: string }
  | { status: 'declined'; code: string; message: string }
  | { status: 'failed'; code: string; message: string }

/** The payment layer: the Stripe SDK, where it points, and the two calls a purchase makes. */
export interface Payments {
  /** 'test' when no real money moves (a mock server or a Stripe test key). */
  readonly mode: 'test' | 'live'
  /** 'stripe-js' when the SDK talks to Stripe itself, which needs card details from Stripe.js. */
  readonly cardEntry: 'test-tokens' | 'stripe-js'
  /** Where the SDK points, for the start-up log. */
  readonly endpoint: string
  readonly stripe: Stripe
  publicConfig(): PaymentsConfig
  /** Creates the firm's Stripe customer; the key makes concurrent first purchases share one. */
  createCustomer(firm: { id: string; name: string }): Promise<string>
  /** Charges a card; rate limits are retried here, every other failure is classified. */
  charge(request: ChargeRequest): Promise<ChargeOutcome>
  /** Stops the in-process mock server, if one was started. */
  close(): Promise<void>
}

export interface PaymentsOptions {
  /** Extra attempts after a 429 (the SDK does not retry 429s). Default 4. */
  rateLimitRetries?: number
  /** The first backoff delay after a 429; it doubles on each attempt. Default 500 ms. */
  rateLimitDelayMs?: number
  /** The SDK's own retries of connection errors, 409s and 5xx, with the same idempotency key. Default 2. */
  networkRetries?: number
  log?: (line: string) => void
}

/**
 * Builds the payment layer from the STRIPE_* settings:
 * - STRIPE_SECRET_KEY without STRIPE_API_HOST: the SDK talks to Stripe itself;
 * - STRIPE_API_HOST (with STRIPE_API_PORT, STRIPE_API_PROTOCOL): the SDK talks to that server,
 *   for example stripe-stateful-mock run separately;
 * - neither: stripe-stateful-mock is started in this process on a loopback port.
 */
export async function createPayments(
  stripe: Config['stripe'],
  options: PaymentsOptions = {},
): Promise<Payments> {
  const networkRetries = options.networkRetries ?? 2
  const common = { maxNetworkRetries: networkRetries, timeout: 30_000, appInfo: { name: 'Ordinate' } }

  if (stripe.secretKey && !stripe.host) {
    if (!stripe.publishableKey)
      options.log?.('STRIPE_PUBLISHABLE_KEY is not set: the card form cannot load Stripe.js.')
    const client = new Stripe(stripe.secretKey, common)
    return buildPayments(client, {
      mode: isTestKey(stripe.secretKey) ? 'test' : 'live',
      cardEntry: 'stripe-js',
      endpoint: 'Stripe (api.stripe.com)',
      publishableKey: stripe.publishableKey ?? null,
      options,
    })
  }

  let mock: StripeMockServer | undefined
  let host: string
  let port: number
  let protocol: 'http' | 'https'
  if (stripe.host) {
    host = stripe.host
    protocol = stripe.protocol ?? 'https'
    port = stripe.port ?? (protocol === 'http' ? 80 : 443)
  } else {
    mock = await startStripeMock()
    host = mock.host
    port = mock.port
    protocol = 'http'
  }
  const secretKey = stripe.secretKey ?? MOCK_SECRET_KEY
  const client = new Stripe(secretKey, { ...common, host, port, protocol })
  return buildPayments(client, {
    mode: isTestKey(secretKey) ? 'test' : 'live',
    cardEntry: 'test-tokens',
    endpoint: `${mock ? 'in-process Stripe mock' : 'Stripe-compatible server'} at ${protocol}://${host}:${port}`,
    publishableKey: null,
    options,
    close: mock ? () => mock.close() : undefined,
  })
}

function isTestKey(key: string): boolean {
  return /^(sk|rk)_test_/.test(key)
}

interface BuildSettings {
  mode: Payments['mode']
  cardEntry: Payments['cardEntry']
  endpoint: string
  publishableKey: string | null
  options: PaymentsOptions
  close?: () => Promise<void>
}

function buildPayments(stripe: Stripe, s: BuildSettings): Payments {
  const retries = s.options.rateLimitRetries ?? 4
  const firstDelayMs = s.options.rateLimitDelayMs ?? 500

  /** Retries a call the API answered 429, with exponential backoff and jitter; the caller's idempotency key is reused. */
  async function withRateLimitRetry<T>(call: () => Promise<T>): Promise<T> {
    for (let attempt = 0; ; attempt++) {
      try {
        return await call()
      } catch (err) {
        if (!(err instanceof Stripe.errors.StripeRateLimitError) || attempt >= retries) throw err
        const delayMs = firstDelayMs * 2 ** attempt * (0.5 + Math.random() / 2)
        s.options.log?.(
          `Stripe answered 429; retrying in ${Math.round(delayMs)} ms (attempt ${attempt + 2}).`,
        )
        await sleep(delayMs)
      }
    }
  }

  return {
    mode: s.mode,
    cardEntry: s.cardEntry,
    endpoint: s.endpoint,
    stripe,
    publicConfig: () => ({
      mode: s.mode,
      cardEntry: s.cardEntry,
      publishableKey: s.cardEntry === 'stripe-js' ? s.publishableKey : null,
      testCards: s.cardEntry === 'test-tokens' ? MOCK_TEST_CARDS : [],
    }),

    async createCustomer(firm) {
      const customer = await withRateLimitRetry(() =>
        stripe.customers.create(
          { name: firm.name, metadata: { ordinate_firm_id: firm.id } },
          { idempotencyKey: `ordinate-firm-customer-${firm.id}` },
        ),
      )
      return customer.id
    },

    async charge(request) {
      try {
        const charge = await withRateLimitRetry(() =>
          stripe.charges.create(
            {
              amount: request.amountCents,
              currency: request.currency,
              source: request.cardToken,
              description: request.description,
              metadata: request.metadata,
            },
            { idempotencyKey: request.idempotencyKey },
          ),
        )
        if (charge.status !== 'succeeded' || !charge.paid) {
          return {
            status: 'failed',
            code: 'charge_not_completed',
            message: `The payment service left the charge ${charge.status}; no credits were added.`,
          }
        }
        return {
          status: 'succeeded',
          chargeId: charge.id,
          amountCents: charge.amount,
          currency: charge.currency,
        }
      } catch (err) {
        return classifyStripeError(err)
      }
    },

    close: s.close ?? (() => Promise.resolve()),
  }
}

/** Decline codes in words (Stripe's documented decline codes; the list is not exhaustive). */
const DECLINE_REASONS: Record<string, string> = {
  insufficient_funds: 'insufficient funds',
  generic_decline: 'the card issuer declined it without giving a reason',
  do_not_honor: 'the card issuer declined it without giving a reason',
  fraudulent: 'the card issuer declined it',
  lost_card: 'the card is reported lost',
  stolen_card: 'the card is reported stolen',
  expired_card: 'the card has expired',
  incorrect_cvc: 'the security code is incorrect',
  incorrect_number: 'the card number is incorrect',
  processing_error: 'the card could not be processed',
  card_velocity_exceeded: 'the card’s limit was exceeded',
}

/** A purchase that did not go through: what happened, that no credits moved, and what to do next. */
function notCharged(
  status: 'declined' | 'failed',
  code: string,
  problem: string,
  advice?: string,
): ChargeOutcome {
  return { status, code, message: `${problem}. No credits were added${advice ? `; ${advice}` : ''}.` }
}

/** Maps an SDK error to a purchase outcome; anything that is not a Stripe error is rethrown. */
export function classifyStripeError(err: unknown): ChargeOutcome {
  if (err instanceof Stripe.errors.StripeCardError) {
    const reason = DECLINE_REASONS[err.decline_code ?? ''] ?? DECLINE_REASONS[err.code ?? ''] ?? err.message
    return notCharged(
      'declined',
      err.decline_code ?? err.code ?? 'card_declined',
      `The card was declined: ${reason}`,
    )
  }
  if (err instanceof Stripe.errors.StripeRateLimitError) {
    return notCharged(
      'failed',
      'payment_service_busy',
      'The payment service kept answering “too many requests”',
      'try again in a minute',
    )
  }
  if (err instanceof Stripe.errors.StripeConnectionError) {
    return notCharged(
      'failed',
      'payment_service_unreachable',
      'The payment service could not be reached',
      'try again in a moment',
    )
  }
  if (err instanceof Stripe.errors.StripeAPIError) {
    return notCharged(
      'failed',
      'payment_service_error',
      `The payment service had an internal error (${err.message})`,
      'try again in a moment',
    )
  }
  if (
    err instanceof Stripe.errors.StripeAuthenticationError ||
    err instanceof Stripe.errors.StripePermissionError
  ) {
    return notCharged(
      'failed',
      'payment_service_misconfigured',
      'The payment service refused Ordinate’s API key',
      'ask the operator to check STRIPE_SECRET_KEY',
    )
  }
  if (err instanceof Stripe.errors.StripeError) {
    return notCharged(
      'failed',
      'payment_rejected',
      `The payment service refused the payment (${err.message})`,
    )
  }
  throw err
}
