import { ref } from 'vue'

/** A v4 UUID; crypto.randomUUID exists only in secure contexts, getRandomValues everywhere. */
export function newPurchaseId(): string {
  if (typeof crypto.randomUUID === 'function') return crypto.randomUUID()
  const b = crypto.getRandomValues(new Uint8Array(16))
  b[6] = (b[6]! & 0x0f) | 0x40
  b[8] = (b[8]! & 0x3f) | 0x80
  const hex = Array.from(b, (x) => x.toString(16).padStart(2, '0')).join('')
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`
}

/**
 * The purchase id of the attempt in progress. It is made once per attempt, so a double click or
 * a resend after a lost connection carries the same id and the server charges once. It is
 * dropped when the server has given a definite answer, or when the choice changes, so the
 * next attempt is a new purchase.
 */
export function usePurchaseAttempt() {
  const purchaseId = ref<string | null>(null)

  function current(): string {
    purchaseId.value ??= newPurchaseId()
    return purchaseId.value
  }

  function finish(): void {
    purchaseId.value = null
  }

  return { purchaseId, current, finish }
}
