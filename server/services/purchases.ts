import { and, desc, eq, isNull, lte, sql } from 'drizzle-orm'
import { findCreditPack, type CreditPack } from '../../shared/credits/creditPacks.js'
import type { Purchase, PurchaseBody, PurchaseResult } from '../../shared/schemas/credits.js'
import type { Db, Tx } from '../db/client.js'
import { creditLedger, firms, purchases, users } from '../db/schema.js'
import { badGateway, conflict, HttpError } from '../httpError.js'
import { newId } from '../ids.js'
import type { Member } from '../middleware/auth.js'
import { classifyStripeError, type ChargeOutcome, type Payments } from '../payments/payments.js'
import { purchaseReceiptMail } from '../payments/purchaseReceiptMail.js'
import { recordAudit } from './audit.js'
import { appendLedger } from './credits.js'
import { enqueueMail } from './mail.js'

type PurchaseRow = typeof purchases.$inferSelect

/**
 * Purchases being charged right now in this process, keyed by firm and client purchase id. A
 * second request with the same id waits for the first instead of charging again; the database
 * row (unique per firm and client id) covers requests that arrive after it settled.
 */
const inFlight = new Map<string, Promise<PurchaseRow>>()

export interface CreatePurchaseOutcome {
  result: PurchaseResult
  /** True when this purchase id had been seen before and the first result was answered again. */
  replayed: boolean
}

/**
 * Buys a pack of run credits by card. The purchase row is written first, keyed by the client's
 * purchase id, so repeated or concurrent requests converge on one row and one charge; the charge
 * carries an idempotency key derived from the same id. On success one transaction marks the
 * purchase succeeded, appends the ledger entry and queues the receipt. A decline answers 402 and
 * a payment-service failure 502; both are recorded and credit nothing.
 */
export async function createPurchase(
  db: Db,
  payments: Payments,
  member: Member,
  body: PurchaseBody,
): Promise<CreatePurchaseOutcome> {
  const pack = findCreditPack(body.packId)
  if (!pack) throw new Error(`unknown pack ${body.packId} passed validation`)
  const inserted = db
    .insert(purchases)
    .values({
      id: newId(),
      firmId: member.firmId,
      clientPurchaseId: body.purchaseId,
      packId: pack.id,
      credits: pack.credits,
      amountCents: pack.priceCents,
      currency: pack.currency,
      status: 'pending',
      createdBy: member.userId,
      createdAt: Date.now(),
    })
    .onConflictDoNothing({ target: [purchases.firmId, purchases.clientPurchaseId] })
    .run()
  let row = purchaseRow(db, member.firmId, body.purchaseId)
  if (row.packId !== pack.id) {
    throw conflict(
      'This purchase id was already used for a different pack. Start a new purchase.',
      'purchase_id_reused',
    )
  }
  if (row.status === 'pending') {
    const key = `${member.firmId}:${body.purchaseId}`
    let settling = inFlight.get(key)
    if (!settling) {
      // A pending row with nothing in flight is new, or was left by a process that stopped
      // mid-charge: charging again with the same idempotency key is safe either way.
      settling = settlePurchase(db, payments, member, row, pack, body.cardToken).finally(() =>
        inFlight.delete(key),
      )
      inFlight.set(key, settling)
    }
    row = await settling
  }
  return { result: answerFor(db, row), replayed: inserted.changes === 0 }
}

async function settlePurchase(
  db: Db,
  payments: Payments,
  member: Member,
  row: PurchaseRow,
  pack: CreditPack,
  cardToken: string,
): Promise<PurchaseRow> {
  let outcome: ChargeOutcome
  try {
    const customerId = await firmCustomerId(db, payments, member)
    outcome = await payments.charge({
      amountCents: row.amountCents,
      currency: row.currency,
      cardToken,
      idempotencyKey: `ordinate-purchase-${member.firmId}-${row.clientPurchaseId}`,
      description: `Ordinate ${pack.name}: ${pack.credits} run credits`,
      // A one-off card token cannot be charged together with `customer` unless it is first saved
      // on the customer; Ordinate keeps no cards on file, so the charge names the customer here.
      metadata: {
        ordinate_firm_id: member.firmId,
        ordinate_purchase_id: row.id,
        ordinate_pack_id: pack.id,
        ordinate_customer_id: customerId,
      },
    })
  } catch (err) {
    outcome = classifyStripeError(err)
  }

  const finishedAt = Date.now()
  db.transaction(
    (tx) => {
      /** Settles the purchase if it is still pending; false when another request settled it first. */
      const settle = (fields: Partial<typeof purchases.$inferInsert>) =>
        tx
          .update(purchases)
          .set({ ...fields, finishedAt })
          .where(and(eq(purchases.id, row.id), eq(purchases.status, 'pending')))
          .run().changes === 1
      const base = {
        firmId: member.firmId,
        userId: member.userId,
        subjectType: 'purchase',
        subjectId: row.id,
      }
      if (outcome.status === 'succeeded') {
        const settled = settle({
          status: 'succeeded',
          stripeChargeId: outcome.chargeId,
          amountCents: outcome.amountCents,
          currency: outcome.currency,
        })
        if (!settled) return
        appendLedger(tx, {
          firmId: member.firmId,
          delta: row.credits,
          kind: 'purchase',
          purchaseId: row.id,
          userId: member.userId,
          note: `${pack.name}, charge ${outcome.chargeId}`,
        })
        recordAudit(tx, {
          ...base,
          action: 'credits.purchased',
          detail: {
            packId: pack.id,
            credits: row.credits,
            amountCents: outcome.amountCents,
            currency: outcome.currency,
            chargeId: outcome.chargeId,
          },
        })
        const balance = balanceThrough(tx, member.firmId, row.id)
        enqueueMail(
          tx,
          purchaseReceiptMail({
            to: member.email,
            adminName: member.name,
            firmName: member.firmName,
            packName: pack.name,
            credits: row.credits,
            amountCents: outcome.amountCents,
            currency: outcome.currency,
            balance,
            chargeId: outcome.chargeId,
            purchasedAt: finishedAt,
            testMode: payments.mode === 'test',
          }),
        )
      } else {
        const settled = settle({
          status: outcome.status,
          failureCode: outcome.code,
          failureMessage: outcome.message,
        })
        if (!settled) return
        recordAudit(tx, {
          ...base,
          action: outcome.status === 'declined' ? 'credits.purchase_declined' : 'credits.purchase_failed',
          detail: { packId: pack.id, credits: row.credits, code: outcome.code },
        })
      }
    },
    { behavior: 'immediate' },
  )
  return purchaseRow(db, member.firmId, row.clientPurchaseId)
}

/** The firm's Stripe customer, created on its first purchase and kept on the firm. */
async function firmCustomerId(db: Db, payments: Payments, member: Member): Promise<string> {
  const stored = db
    .select({ id: firms.stripeCustomerId })
    .from(firms)
    .where(eq(firms.id, member.firmId))
    .get()
  if (stored?.id) return stored.id
  const created = await payments.createCustomer({ id: member.firmId, name: member.firmName })
  db.update(firms)
    .set({ stripeCustomerId: created })
    .where(and(eq(firms.id, member.firmId), isNull(firms.stripeCustomerId)))
    .run()
  return (
    db.select({ id: firms.stripeCustomerId }).from(firms).where(eq(firms.id, member.firmId)).get()?.id ??
    created
  )
}

/** Answers a settled purchase: the result for a success, the recorded error otherwise. */
function answerFor(db: Db, row: PurchaseRow): PurchaseResult {
  switch (row.status) {
    case 'succeeded':
      return { balance: balanceThrough(db, row.firmId, row.id), purchase: toPurchase(db, row) }
    case 'declined':
      throw new HttpError(
        402,
        'card_declined',
        row.failureMessage ?? 'The card was declined. No credits were added.',
      )
    case 'failed':
      throw badGateway(
        row.failureMessage ?? 'The payment service failed. No credits were added.',
        row.failureCode ?? 'payment_failed',
      )
    case 'pending':
      throw conflict('This purchase is still being processed. Try again in a moment.', 'purchase_pending')
  }
}

/**
 * The balance just after this purchase was credited: the ledger summed up to and including its
 * entry, so a repeated request answers exactly what the first one did.
 */
function balanceThrough(db: Tx, firmId: string, purchaseRowId: string): number {
  const entry = db
    .select({ id: creditLedger.id })
    .from(creditLedger)
    .where(and(eq(creditLedger.purchaseId, purchaseRowId), eq(creditLedger.kind, 'purchase')))
    .get()
  if (!entry) throw new Error(`purchase ${purchaseRowId} succeeded without a ledger entry`)
  const row = db
    .select({ total: sql<number>`coalesce(sum(${creditLedger.delta}), 0)` })
    .from(creditLedger)
    .where(and(eq(creditLedger.firmId, firmId), lte(creditLedger.id, entry.id)))
    .get()
  return row?.total ?? 0
}

function purchaseRow(db: Tx, firmId: string, clientPurchaseId: string): PurchaseRow {
  const row = db
    .select()
    .from(purchases)
    .where(and(eq(purchases.firmId, firmId), eq(purchases.clientPurchaseId, clientPurchaseId)))
    .get()
  if (!row) throw new Error(`purchase ${clientPurchaseId} vanished`)
  return row
}

const purchaseColumns = {
  row: purchases,
  creatorName: users.name,
}

function shape(row: PurchaseRow, creatorName: string): Purchase {
  return {
    id: row.id,
    purchaseId: row.clientPurchaseId,
    packId: row.packId,
    credits: row.credits,
    amountCents: row.amountCents,
    currency: row.currency,
    status: row.status,
    chargeId: row.stripeChargeId,
    failureCode: row.failureCode,
    failureMessage: row.failureMessage,
    createdBy: { id: row.createdBy, name: creatorName },
    createdAt: row.createdAt,
    finishedAt: row.finishedAt,
  }
}

function toPurchase(db: Db, row: PurchaseRow): Purchase {
  const creator = db.select({ name: users.name }).from(users).where(eq(users.id, row.createdBy)).get()
  return shape(row, creator?.name ?? '')
}

/** The firm's purchase attempts, newest first: succeeded, declined, failed and pending alike. */
export function listPurchases(db: Db, firmId: string): Purchase[] {
  return db
    .select(purchaseColumns)
    .from(purchases)
    .innerJoin(users, eq(users.id, purchases.createdBy))
    .where(eq(purchases.firmId, firmId))
    .orderBy(desc(purchases.createdAt))
    .all()
    .map(({ row, creatorName }) => shape(row, creatorName))
}
