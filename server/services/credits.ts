import { desc, eq, sql } from 'drizzle-orm'
import type { CreditsSummary, LedgerKind } from '../../shared/schemas/credits.js'
import type { Tx } from '../db/client.js'
import { creditLedger } from '../db/schema.js'
import { paymentRequired } from '../httpError.js'

/** The firm's balance: the sum of its append-only ledger. */
export function creditBalance(db: Tx, firmId: string): number {
  const row = db
    .select({ total: sql<number>`coalesce(sum(${creditLedger.delta}), 0)` })
    .from(creditLedger)
    .where(eq(creditLedger.firmId, firmId))
    .get()
  return row?.total ?? 0
}

export function creditsSummary(db: Tx, firmId: string, limit = 500): CreditsSummary {
  const entries = db
    .select({
      id: creditLedger.id,
      delta: creditLedger.delta,
      kind: creditLedger.kind,
      runId: creditLedger.runId,
      purchaseId: creditLedger.purchaseId,
      userId: creditLedger.userId,
      note: creditLedger.note,
      createdAt: creditLedger.createdAt,
    })
    .from(creditLedger)
    .where(eq(creditLedger.firmId, firmId))
    .orderBy(desc(creditLedger.id))
    .limit(limit)
    .all()
  return { balance: creditBalance(db, firmId), entries }
}

export interface LedgerWrite {
  firmId: string
  delta: number
  kind: LedgerKind
  runId?: string
  purchaseId?: string
  userId?: string
  note?: string
}

/** Appends one ledger row. Call inside the transaction that makes the change it pays for. */
export function appendLedger(db: Tx, entry: LedgerWrite): void {
  db.insert(creditLedger)
    .values({ ...entry, createdAt: Date.now() })
    .run()
}

/**
 * Reserves one credit for a run. Must be called inside an IMMEDIATE transaction together with
 * the insert of the run, so two concurrent requests can never both spend the last credit.
 */
export function reserveRunCredit(db: Tx, firmId: string, runId: string, userId: string): void {
  if (creditBalance(db, firmId) < 1) {
    throw paymentRequired(
      'Your firm has no run credits left. An admin can buy more on the Credits page.',
      'no_credits',
    )
  }
  appendLedger(db, { firmId, delta: -1, kind: 'run_reserved', runId, userId })
}

/** Returns the credit of a run that failed. Idempotent: a run is refunded at most once. */
export function returnRunCredit(db: Tx, firmId: string, runId: string, note: string): void {
  const already = db
    .select({ id: creditLedger.id })
    .from(creditLedger)
    .where(sql`${creditLedger.runId} = ${runId} and ${creditLedger.kind} = 'run_returned'`)
    .get()
  if (already) return
  appendLedger(db, { firmId, delta: 1, kind: 'run_returned', runId, note })
}
