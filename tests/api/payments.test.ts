import { randomUUID } from 'node:crypto'
import { and, eq, sql } from 'drizzle-orm'
import type Stripe from 'stripe'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { creditPacks } from '../../shared/credits/creditPacks.js'
import { auditLog, creditLedger, firms, mailOutbox, memberships, purchases } from '../../server/db/schema.js'
import { createPayments, type Payments } from '../../server/payments/payments.js'
import { startStripeMock, type StripeMockServer } from '../../server/payments/stripeMock.js'
import { creditBalance, reserveRunCredit, returnRunCredit } from '../../server/services/credits.js'
import { createTestContext, type TestContext } from '../support/testApp.js'
import type request from 'supertest'

const ADMIN = 'admin@ordinate.test'
const small = creditPacks[0]

let mock: StripeMockServer
let payments: Payments
let ctx: TestContext
let admin: request.Agent
let firmId: string
const paymentLog: string[] = []

beforeAll(async () => {
  // The real stripe-stateful-mock HTTP server on loopback, reached the way STRIPE_API_HOST would reach it.
  mock = await startStripeMock()
  payments = await createPayments(
    { host: mock.host, port: mock.port, protocol: 'http' },
    { rateLimitDelayMs: 20, log: (line) => paymentLog.push(line) },
  )
  ctx = await createTestContext((deps) => {
    deps.payments = payments
  })
  admin = await ctx.signIn(ADMIN)
  firmId = ctx.seed.firmIds[0]!
})

afterAll(async () => {
  ctx.close()
  await payments.close()
  await mock.close()
})

const buy = (
  agent: request.Agent,
  cardToken: string,
  purchaseId: string = randomUUID(),
  packId: string = small.id,
) => agent.post('/api/credits/purchases').send({ packId, cardToken, purchaseId })

const balanceOf = (id = firmId) => creditBalance(ctx.db, id)

const purchaseLedgerRows = (purchaseRowId: string) =>
  ctx.db
    .select()
    .from(creditLedger)
    .where(and(eq(creditLedger.purchaseId, purchaseRowId), eq(creditLedger.kind, 'purchase')))
    .all()

/** Every charge the mock server holds for one purchase (Ordinate puts the purchase id in the charge metadata). */
async function mockChargesFor(purchaseRowId: string): Promise<Stripe.Charge[]> {
  const all = await payments.stripe.charges.list({ limit: 100 }).autoPagingToArray({ limit: 10_000 })
  return all.filter((c) => c.metadata['ordinate_purchase_id'] === purchaseRowId)
}

describe('GET /api/credits/packs', () => {
  it('answers the three packs with credits and price', async () => {
    const res = await admin.get('/api/credits/packs')
    expect(res.status).toBe(200)
    expect(res.body.items).toHaveLength(3)
    for (const item of res.body.items) {
      expect(Object.keys(item).sort()).toEqual(['credits', 'currency', 'id', 'name', 'priceCents'])
      expect(item.credits).toBeGreaterThan(0)
      expect(item.priceCents).toBeGreaterThan(0)
    }
  })
})

describe('GET /api/payments/config', () => {
  it('reports test mode and offers the mock server’s test cards under plain descriptions', async () => {
    const res = await (await ctx.signIn('engineer@ordinate.test')).get('/api/payments/config')
    expect(res.status).toBe(200)
    expect(res.body.mode).toBe('test')
    expect(res.body.cardEntry).toBe('test-tokens')
    expect(res.body.publishableKey).toBeNull()
    const labels = Object.fromEntries(
      res.body.testCards.map((c: { token: string; label: string }) => [c.token, c.label]),
    )
    expect(labels['tok_visa']).toBe('test card: succeeds')
    expect(labels['tok_chargeDeclinedInsufficientFunds']).toBe('test card: declined (insufficient funds)')
    expect(labels['tok_429|tok_visa']).toBe('test card: rate-limited once, then succeeds')
  })
})

describe('POST /api/credits/purchases', () => {
  describe('with a card that succeeds', () => {
    let res: request.Response
    let before: number
    beforeAll(async () => {
      before = balanceOf()
      res = await buy(admin, 'tok_visa')
    })

    it('answers 201 with the new balance and the succeeded purchase', () => {
      expect(res.status).toBe(201)
      expect(res.body.balance).toBe(before + small.credits)
      expect(res.body.purchase).toMatchObject({
        packId: small.id,
        credits: small.credits,
        amountCents: small.priceCents,
        currency: small.currency,
        status: 'succeeded',
        failureCode: null,
      })
      expect(res.body.purchase.chargeId).toMatch(/^ch_/)
    })

    it('adds exactly one ledger entry of the pack’s credits', () => {
      const rows = purchaseLedgerRows(res.body.purchase.id)
      expect(rows).toHaveLength(1)
      expect(rows[0]!.delta).toBe(small.credits)
      expect(balanceOf()).toBe(before + small.credits)
    })

    it('charged the pack’s price on the payment server, once', async () => {
      const charges = await mockChargesFor(res.body.purchase.id)
      expect(charges).toHaveLength(1)
      expect(charges[0]!.id).toBe(res.body.purchase.chargeId)
      expect(charges[0]!.amount).toBe(small.priceCents)
      expect(charges[0]!.status).toBe('succeeded')
    })

    it('creates one Stripe customer for the firm and reuses it for the next purchase', async () => {
      const customerId = ctx.db
        .select({ id: firms.stripeCustomerId })
        .from(firms)
        .where(eq(firms.id, firmId))
        .get()?.id
      expect(customerId).toMatch(/^cus_/)
      const again = await buy(admin, 'tok_visa')
      expect(again.status).toBe(201)
      const after = ctx.db
        .select({ id: firms.stripeCustomerId })
        .from(firms)
        .where(eq(firms.id, firmId))
        .get()?.id
      expect(after).toBe(customerId)
      const [charge] = await mockChargesFor(again.body.purchase.id)
      expect(charge?.metadata['ordinate_customer_id']).toBe(customerId)
      const customers = await payments.stripe.customers
        .list({ limit: 100 })
        .autoPagingToArray({ limit: 10_000 })
      expect(customers.filter((c) => c.metadata['ordinate_firm_id'] === firmId)).toHaveLength(1)
    })

    it('queues an e-mailed receipt to the admin: pack, amount, new balance and charge id', () => {
      const mail = ctx.db
        .select()
        .from(mailOutbox)
        .all()
        .find((m) => m.textBody.includes(res.body.purchase.chargeId))
      expect(mail).toBeDefined()
      expect(mail!.toAddress).toBe(ADMIN)
      expect(mail!.textBody).toContain(`${small.name} (${small.credits} run credits)`)
      expect(mail!.textBody).toContain('Amount: $40.00')
      expect(mail!.textBody).toContain(`New balance: ${res.body.balance} run credits`)
      expect(mail!.htmlBody).toContain(res.body.purchase.chargeId)
    })

    it('writes an audit row', () => {
      const row = ctx.db
        .select()
        .from(auditLog)
        .where(and(eq(auditLog.subjectId, res.body.purchase.id), eq(auditLog.action, 'credits.purchased')))
        .get()
      expect(row?.userId).toBe(ctx.seed.userIds[ADMIN])
    })
  })

  describe('with a declined card', () => {
    it('answers 402 card_declined with the reason in words, credits nothing and records the attempt', async () => {
      const before = balanceOf()
      const purchaseId = randomUUID()
      const res = await buy(admin, 'tok_chargeDeclinedInsufficientFunds', purchaseId)
      expect(res.status).toBe(402)
      expect(res.body.error.code).toBe('card_declined')
      expect(res.body.error.message).toMatch(/declined: insufficient funds/)
      expect(balanceOf()).toBe(before)
      const row = ctx.db.select().from(purchases).where(eq(purchases.clientPurchaseId, purchaseId)).get()
      expect(row).toMatchObject({
        status: 'declined',
        failureCode: 'insufficient_funds',
        stripeChargeId: null,
      })
      expect(purchaseLedgerRows(row!.id)).toHaveLength(0)
      const audit = ctx.db.select().from(auditLog).where(eq(auditLog.subjectId, row!.id)).all()
      expect(audit.map((a) => a.action)).toEqual(['credits.purchase_declined'])
    })
  })

  describe('when the payment server answers 429 once (tok_429|tok_visa|<random>)', () => {
    it('retries with backoff and the same idempotency key, and credits once', async () => {
      const before = balanceOf()
      const logged = paymentLog.length
      const res = await buy(admin, `tok_429|tok_visa|${randomUUID()}`)
      expect(res.status).toBe(201)
      expect(res.body.balance).toBe(before + small.credits)
      expect(paymentLog.slice(logged).filter((l) => l.includes('429'))).toHaveLength(1)
      expect(purchaseLedgerRows(res.body.purchase.id)).toHaveLength(1)
      expect(await mockChargesFor(res.body.purchase.id)).toHaveLength(1)
    })
  })

  describe('when the payment server keeps answering 429', () => {
    it('gives up after its retries with 502 and credits nothing', async () => {
      const before = balanceOf()
      const logged = paymentLog.length
      const res = await buy(admin, 'tok_429')
      expect(res.status).toBe(502)
      expect(res.body.error.code).toBe('payment_service_busy')
      expect(paymentLog.slice(logged).filter((l) => l.includes('429'))).toHaveLength(4)
      expect(balanceOf()).toBe(before)
    })
  })

  describe('when the payment server fails with a 500 (tok_500)', () => {
    it('answers 502 with a message, credits nothing and records the attempt as failed', async () => {
      const before = balanceOf()
      const purchaseId = randomUUID()
      const res = await buy(admin, 'tok_500', purchaseId)
      expect(res.status).toBe(502)
      expect(res.body.error.code).toBe('payment_service_error')
      expect(res.body.error.message).toMatch(/No credits were added/)
      expect(balanceOf()).toBe(before)
      const row = ctx.db.select().from(purchases).where(eq(purchases.clientPurchaseId, purchaseId)).get()
      expect(row?.status).toBe('failed')
      expect(purchaseLedgerRows(row!.id)).toHaveLength(0)
    })

    it('lets the member try again, which is a new purchase', async () => {
      const before = balanceOf()
      const res = await buy(admin, 'tok_visa')
      expect(res.status).toBe(201)
      expect(balanceOf()).toBe(before + small.credits)
    })
  })

  describe('with the same purchaseId sent twice in sequence', () => {
    it('answers the first result again without a second charge or credit', async () => {
      const before = balanceOf()
      const purchaseId = randomUUID()
      const first = await buy(admin, 'tok_visa', purchaseId)
      const second = await buy(admin, 'tok_visa', purchaseId)
      expect(first.status).toBe(201)
      expect(second.status).toBe(201)
      expect(second.headers['idempotent-replayed']).toBe('true')
      expect(second.body).toEqual(first.body)
      expect(balanceOf()).toBe(before + small.credits)
      expect(purchaseLedgerRows(first.body.purchase.id)).toHaveLength(1)
      expect(await mockChargesFor(first.body.purchase.id)).toHaveLength(1)
    })

    it('answers a repeated declined attempt with the same 402', async () => {
      const purchaseId = randomUUID()
      const first = await buy(admin, 'tok_chargeDeclinedInsufficientFunds', purchaseId)
      const second = await buy(admin, 'tok_chargeDeclinedInsufficientFunds', purchaseId)
      expect(first.status).toBe(402)
      expect(second.status).toBe(402)
      expect(second.body).toEqual(first.body)
    })

    it('refuses the same purchaseId for a different pack with 409', async () => {
      const purchaseId = randomUUID()
      expect((await buy(admin, 'tok_visa', purchaseId)).status).toBe(201)
      const res = await buy(admin, 'tok_visa', purchaseId, creditPacks[1].id)
      expect(res.status).toBe(409)
      expect(res.body.error.code).toBe('purchase_id_reused')
    })
  })

  describe('with the same purchaseId sent concurrently', () => {
    it('charges and credits once, and every request answers the same result', async () => {
      const before = balanceOf()
      const purchaseId = randomUUID()
      const answers = await Promise.all(Array.from({ length: 6 }, () => buy(admin, 'tok_visa', purchaseId)))
      expect(answers.map((a) => a.status)).toEqual([201, 201, 201, 201, 201, 201])
      for (const a of answers) expect(a.body).toEqual(answers[0]!.body)
      expect(answers[0]!.body.balance).toBe(before + small.credits)
      expect(balanceOf()).toBe(before + small.credits)
      expect(
        ctx.db.select().from(purchases).where(eq(purchases.clientPurchaseId, purchaseId)).all(),
      ).toHaveLength(1)
      expect(purchaseLedgerRows(answers[0]!.body.purchase.id)).toHaveLength(1)
      expect(await mockChargesFor(answers[0]!.body.purchase.id)).toHaveLength(1)
    })

    it('also converges when the first attempt is rate-limited and retried', async () => {
      const before = balanceOf()
      const purchaseId = randomUUID()
      const token = `tok_429|tok_visa|${randomUUID()}`
      const answers = await Promise.all(Array.from({ length: 4 }, () => buy(admin, token, purchaseId)))
      expect(answers.map((a) => a.status)).toEqual([201, 201, 201, 201])
      expect(new Set(answers.map((a) => a.body.purchase.chargeId)).size).toBe(1)
      expect(balanceOf()).toBe(before + small.credits)
      expect(await mockChargesFor(answers[0]!.body.purchase.id)).toHaveLength(1)
    })
  })

  describe('with a malformed body', () => {
    it('responds 400 naming an unknown pack', async () => {
      const res = await buy(admin, 'tok_visa', randomUUID(), 'pack-huge')
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(/^packId:/)
    })

    it('responds 400 to an unknown field', async () => {
      const res = await admin
        .post('/api/credits/purchases')
        .send({ packId: small.id, cardToken: 'tok_visa', purchaseId: randomUUID(), credits: 1000 })
      expect(res.status).toBe(400)
      expect(res.body.error.code).toBe('invalid_input')
    })

    it('responds 400 naming a purchaseId that is not a UUID', async () => {
      const res = await buy(admin, 'tok_visa', 'twice')
      expect(res.status).toBe(400)
      expect(res.body.error.message).toMatch(/^purchaseId:/)
    })
  })

  describe('as a member without the admin role', () => {
    it.each(['engineer@ordinate.test', 'checker@ordinate.test'])(
      'refuses %s with 403 naming the admin role',
      async (email) => {
        const agent = await ctx.signIn(email)
        const before = balanceOf()
        const res = await buy(agent, 'tok_visa')
        expect(res.status).toBe(403)
        expect(res.body.error.message).toMatch(/admin role/)
        expect(balanceOf()).toBe(before)
        expect((await agent.get('/api/credits/purchases')).status).toBe(403)
      },
    )

    it('refuses a signed-out visitor with 401', async () => {
      expect((await buy(ctx.anonymous(), 'tok_visa')).status).toBe(401)
    })
  })
})

describe('GET /api/credits/purchases', () => {
  it('answers the firm’s purchase history to an admin, with declined and failed attempts', async () => {
    const res = await admin.get('/api/credits/purchases')
    expect(res.status).toBe(200)
    const statuses = new Set(res.body.items.map((p: { status: string }) => p.status))
    expect(statuses).toEqual(new Set(['succeeded', 'declined', 'failed']))
    expect(res.body.items[0].createdBy.name).toBe('Ruth Okonkwo-Baines')
    const times = res.body.items.map((p: { createdAt: number }) => p.createdAt)
    expect([...times].sort((a, b) => b - a)).toEqual(times)
  })
})

describe('GET /api/credits', () => {
  it('answers the balance as the sum of the ledger after a mix of runs and purchases', async () => {
    const mixed = await createTestContext((deps) => {
      deps.payments = payments
    })
    try {
      const mixedFirm = mixed.seed.firmIds[0]!
      const engineerId = mixed.seed.userIds['engineer@ordinate.test']!
      const runIds = [randomUUID(), randomUUID(), randomUUID()]
      mixed.db.transaction(
        (tx) => runIds.forEach((runId) => reserveRunCredit(tx, mixedFirm, runId, engineerId)),
        { behavior: 'immediate' },
      )
      mixed.db.transaction((tx) => returnRunCredit(tx, mixedFirm, runIds[1]!, 'run failed'), {
        behavior: 'immediate',
      })
      mixed.db.transaction((tx) => returnRunCredit(tx, mixedFirm, runIds[1]!, 'run failed'), {
        behavior: 'immediate',
      })
      const mixedAdmin = await mixed.signIn(ADMIN)
      expect((await buy(mixedAdmin, 'tok_visa', randomUUID(), creditPacks[1].id)).status).toBe(201)
      expect((await buy(mixedAdmin, 'tok_chargeDeclinedInsufficientFunds')).status).toBe(402)
      expect((await buy(mixedAdmin, 'tok_500')).status).toBe(502)
      mixed.db.transaction((tx) => reserveRunCredit(tx, mixedFirm, randomUUID(), engineerId), {
        behavior: 'immediate',
      })

      const res = await (await mixed.signIn('engineer@ordinate.test')).get('/api/credits')
      expect(res.status).toBe(200)
      const sum = res.body.entries.reduce((s: number, e: { delta: number }) => s + e.delta, 0)
      // 25 opening credits, 3 runs charged, 1 returned (once, although returned twice), 50 bought, 1 more run.
      expect(res.body.balance).toBe(25 - 3 + 1 + creditPacks[1].credits - 1)
      expect(res.body.balance).toBe(sum)
      const kinds = res.body.entries.map((e: { kind: string }) => e.kind).sort()
      expect(kinds).toEqual([
        'grant',
        'purchase',
        'run_reserved',
        'run_reserved',
        'run_reserved',
        'run_reserved',
        'run_returned',
      ])
      const direct = mixed.db
        .select({ total: sql<number>`sum(${creditLedger.delta})` })
        .from(creditLedger)
        .where(eq(creditLedger.firmId, mixedFirm))
        .get()
      expect(direct?.total).toBe(res.body.balance)
    } finally {
      mixed.close()
    }
  })

  it('keeps firms apart: another firm’s admin buying with the same purchaseId makes a separate purchase', async () => {
    const purchaseId = randomUUID()
    expect((await buy(admin, 'tok_visa', purchaseId)).status).toBe(201)
    const outsiderId = ctx.seed.userIds['outsider@ordinate.test']!
    ctx.db
      .update(memberships)
      .set({ roles: ['engineer', 'admin'] })
      .where(eq(memberships.userId, outsiderId))
      .run()
    const outsider = await ctx.signIn('outsider@ordinate.test')
    const otherFirm = ctx.seed.firmIds[1]!
    const before = balanceOf(otherFirm)
    const res = await buy(outsider, 'tok_visa', purchaseId)
    expect(res.status).toBe(201)
    expect(res.body.balance).toBe(before + small.credits)
    const list = await outsider.get('/api/credits/purchases')
    expect(list.body.items).toHaveLength(1)
    expect((await outsider.get('/api/credits')).body.balance).toBe(before + small.credits)
  })
})

describe('when the payment server is down', () => {
  it('answers 502 with a message, credits nothing and records the attempt as failed', async () => {
    const doomed = await startStripeMock()
    const downPayments = await createPayments(
      { host: doomed.host, port: doomed.port, protocol: 'http' },
      { networkRetries: 1 },
    )
    await doomed.close()
    const down = await createTestContext((deps) => {
      deps.payments = downPayments
    })
    try {
      const downFirm = down.seed.firmIds[0]!
      const before = creditBalance(down.db, downFirm)
      const purchaseId = randomUUID()
      const res = await buy(await down.signIn(ADMIN), 'tok_visa', purchaseId)
      expect(res.status).toBe(502)
      expect(res.body.error.code).toBe('payment_service_unreachable')
      expect(res.body.error.message).toMatch(/could not be reached/)
      expect(creditBalance(down.db, downFirm)).toBe(before)
      expect(
        down.db.select().from(purchases).where(eq(purchases.clientPurchaseId, purchaseId)).get()?.status,
      ).toBe('failed')
    } finally {
      down.close()
      await downPayments.close()
    }
  })
})

describe('the Content-Security-Policy', () => {
  it('allows Stripe.js only when card details are collected with it', async () => {
    const mockCsp = String((await ctx.anonymous().get('/api/health')).headers['content-security-policy'])
    expect(mockCsp).not.toContain('stripe.com')
    const livePayments = await createPayments({
      secretKey: 'sk_live_notarealkey',
      publishableKey: 'pk_live_notarealkey',
    })
    const live = await createTestContext((deps) => {
      deps.payments = livePayments
    })
    try {
      const csp = String((await live.anonymous().get('/api/health')).headers['content-security-policy'])
      expect(csp).toMatch(/script-src 'self' 'wasm-unsafe-eval' https:\/\/js\.stripe\.com/)
      expect(csp).toMatch(/frame-src https:\/\/js\.stripe\.com https:\/\/hooks\.stripe\.com/)
      expect(csp).toMatch(/connect-src 'self' https:\/\/api\.stripe\.com/)
      const config = await (await live.signIn(ADMIN)).get('/api/payments/config')
      expect(config.body).toEqual({
        mode: 'live',
        cardEntry: 'stripe-js',
        publishableKey: 'pk_live_notarealkey',
        testCards: [],
      })
    } finally {
      live.close()
    }
  })
})

describe('without a payment layer', () => {
  it('answers 503 to a purchase', async () => {
    const bare = await createTestContext()
    try {
      const res = await buy(await bare.signIn(ADMIN), 'tok_visa')
      expect(res.status).toBe(503)
      expect(res.body.error.code).toBe('payments_unavailable')
    } finally {
      bare.close()
    }
  })
})
