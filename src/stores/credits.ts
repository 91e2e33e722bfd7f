import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as creditsApi from '@/api/credits'
import type { CreditPackInfo, CreditsSummary, PaymentsConfig, Purchase, PurchaseResult } from '@/api/credits'
import { ApiError } from '@/api/client'
import { useRequestState } from '@/composables/useRequestState'
import { purchaseBodySchema } from '../../shared/schemas/credits'

/**
 * The firm's run credits: balance and ledger for every member; packs, payment settings and the
 * purchase history for admins, who also buy here. The balance is kept here only; starting a run
 * (runs store) notes its charge here.
 */
export const useCreditsStore = defineStore('credits', () => {
  const summary = ref<CreditsSummary | null>(null)
  const packs = ref<CreditPackInfo[]>([])
  const purchases = ref<Purchase[]>([])
  const paymentsConfig = ref<PaymentsConfig | null>(null)
  const loading = ref(false)
  const buying = ref(false)
  const { error, report, read } = useRequestState()

  /** The balance as last heard from the server, less the runs charged since. */
  const balance = ref<number | null>(null)

  function adopt(s: CreditsSummary) {
    summary.value = s
    balance.value = s.balance
  }

  /** Loads the balance and ledger, the packs and payment settings, and for admins the purchase history. */
  async function load(options: { admin: boolean }): Promise<void> {
    await read(loading, 'Could not load the credits', async () => {
      const [s, p, c, h] = await Promise.all([
        creditsApi.getCredits(),
        creditsApi.listPacks(),
        creditsApi.getPaymentsConfig(),
        options.admin ? creditsApi.listPurchases() : Promise.resolve([]),
      ])
      adopt(s)
      packs.value = p
      paymentsConfig.value = c
      purchases.value = h
    })
  }

  /** The balance and ledger alone, for a page that shows the balance beside a cost. */
  async function loadBalance(): Promise<void> {
    await read(null, 'Could not read the credit balance', async () => adopt(await creditsApi.getCredits()))
  }

  /** A run was charged: the balance follows without asking the server again. */
  function noteCharged(credits: number) {
    if (balance.value !== null) balance.value = Math.max(0, balance.value - credits)
  }

  /** The server refused a run for want of credits. */
  function noteEmpty() {
    balance.value = 0
  }

  async function refresh(admin: boolean): Promise<void> {
    const [s, h] = await Promise.all([
      creditsApi.getCredits(),
      admin ? creditsApi.listPurchases() : Promise.resolve(purchases.value),
    ])
    adopt(s)
    purchases.value = h
  }

  /**
   * Buys a pack. Resolves the result on success; on failure the ApiError is thrown on (after the
   * history is refreshed, since declined and failed attempts are recorded too) so the form can say
   * what happened beside the card.
   */
  async function buy(input: {
    packId: string
    cardToken: string
    purchaseId: string
  }): Promise<PurchaseResult> {
    buying.value = true
    error.value = null
    try {
      const result = await creditsApi.createPurchase(purchaseBodySchema.parse(input))
      balance.value = result.balance
      await refresh(true).catch((err: unknown) => report(err, 'Could not refresh the ledger'))
      return result
    } catch (err) {
      error.value = err instanceof ApiError ? err.message : report(err)
      if (err instanceof ApiError && err.status !== 0) {
        await refresh(true).catch(() => undefined)
      }
      throw err
    } finally {
      buying.value = false
    }
  }

  return {
    summary,
    packs,
    purchases,
    paymentsConfig,
    loading,
    buying,
    error,
    balance,
    load,
    loadBalance,
    noteCharged,
    noteEmpty,
    buy,
  }
})
