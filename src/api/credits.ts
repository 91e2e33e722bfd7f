import {
  type CreditPackInfo,
  type CreditsSummary,
  type PaymentsConfig,
  type Purchase,
  type PurchaseBody,
  type PurchaseResult,
  creditPackListSchema,
  creditsSummarySchema,
  paymentsConfigSchema,
  purchaseListSchema,
  purchaseResultSchema,
} from '../../shared/schemas/credits'
import { apiRequest } from './client'

export type {
  CreditPackInfo,
  CreditsSummary,
  LedgerEntry,
  PaymentsConfig,
  Purchase,
  PurchaseResult,
  TestCard,
} from '../../shared/schemas/credits'

/** `GET /api/credits`: the firm's balance and ledger, newest entry first (every member). */
export function getCredits(): Promise<CreditsSummary> {
  return apiRequest('/api/credits', creditsSummarySchema)
}

/** `GET /api/credits/packs`: the packs for sale. */
export async function listPacks(): Promise<CreditPackInfo[]> {
  return (await apiRequest('/api/credits/packs', creditPackListSchema)).items
}

/** `GET /api/credits/purchases` (admin): every purchase attempt, newest first. */
export async function listPurchases(): Promise<Purchase[]> {
  return (await apiRequest('/api/credits/purchases', purchaseListSchema)).items
}

/**
 * `POST /api/credits/purchases` (admin). The same `purchaseId` sent again answers the first
 * result and never charges twice; 402 `card_declined` on a decline, 502 when the payment
 * service failed.
 */
export function createPurchase(body: PurchaseBody): Promise<PurchaseResult> {
  return apiRequest('/api/credits/purchases', purchaseResultSchema, { method: 'POST', body })
}

/** `GET /api/payments/config`: test or live mode, and how card details are collected. */
export function getPaymentsConfig(): Promise<PaymentsConfig> {
  return apiRequest('/api/payments/config', paymentsConfigSchema)
}
