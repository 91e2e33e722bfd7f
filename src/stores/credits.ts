import { defineStore } from 'pinia'
import { computed, ref } from 'vue'
import * as creditsApi from '@/api/credits'
import type { CreditPackInfo, CreditsSummary, PaymentsConfig, Purchase, PurchaseResult } from '@/api/credits'
import { ApiError } from '@/api/client'
import { useErrorReporter } from '@/composables/useErrorReporter'
import { purchaseBodySchema } from '../../shared/schemas/credits'

/**
 * The firm's run credits: balance and ledger for every member; packs, payment settings and the
 * purchase history for admins, who also buy here.
 */
export const useCreditsStore = defineStore('credits', () => {
  const summary = ref<CreditsSummary | null>(null)
  const packs = ref<CreditPackInfo[]>([])
  const purchases = ref<Purchase[]>([])
  const paymentsConfig = ref<PaymentsConfig | null>(null)
  const loading = ref(false)
  const buying = ref(false)
  const error = ref<string | null>(null)
  const { report } = useErrorReporter()

  const balance = computed(() => summary.value?.balance ?? null)

  /** Loads the balance and ledger, the packs and payment settings, and for admins the purchase history. */
  async function load(options: { admin: boolean }): Promise<void> {
    loading.value = true
    error.value = null
    try {
      const [s, p, c, h] = await Promise.all([
        creditsApi.getCredits(),
        creditsApi.listPacks(),
        creditsApi.getPaymentsConfig(),
        options.admin ? creditsApi.listPurchases() : Promise.resolve([]),
      ])
      summary.value = s
      packs.value = p
      paymentsConfig.value = c
      purchases.value = h
    } catch (err) {
      error.value = report(err, 'Could not load the credits')
    } finally {
      loading.value = false
    }
  }

  async function refresh(admin: boolean): Promise<void> {
    const [s, h] = await Promise.all([
      creditsApi.getCredits(),
      admin ? creditsApi.listPurchases() : Promise.resolve(purchases.value),
    ])
    summary.value = s
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
      if (summary.value) summary.value = { ...summary.value, balance: result.balance }
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

  return { summary, packs, purchases, paymentsConfig, loading, buying, error, balance, load, buy }
})
