import { type MaybeRefOrGetter, computed, ref, toValue, watch } from 'vue'
import { storeToRefs } from 'pinia'
import { pairCautions } from '../../shared/pairRules'
import { messageFor, useErrorReporter } from '@/composables/useErrorReporter'
import { useRecordsStore } from '@/stores/records'

/**
 * Saving two records of the library as a pair, as every page that makes pairs does it: the
 * first caution of shared/pairRules on the two (one component label twice, say) asks once, and
 * saving the same two again goes ahead; a saved pair is announced. `tooFew` is the page's word
 * for a choice that is not two records.
 */
export function usePairSave(recordIds: MaybeRefOrGetter<readonly (string | null)[]>, tooFew: string) {
  const store = useRecordsStore()
  const { items } = storeToRefs(store)
  const { notify } = useErrorReporter()

  const chosen = computed(() => {
    const ids = toValue(recordIds)
    const [a, b] = ids
    return ids.length === 2 && a && b ? ([a, b] as [string, string]) : null
  })
  const caution = computed(() => {
    const [a, b] = (chosen.value ?? []).map((id) => items.value.find((r) => r.id === id))
    return a && b ? (pairCautions(a, b)[0] ?? null) : null
  })
  /** The caution was shown for these two records: saving again goes ahead. */
  const confirmed = ref(false)
  watch(chosen, () => (confirmed.value = false))
  const saving = ref(false)
  const message = ref<string | null>(null)

  /** Saves the pair (named, or after both records); true once it is saved. */
  async function save(name = ''): Promise<boolean> {
    message.value = null
    const ids = chosen.value
    if (!ids) {
      message.value = tooFew
      return false
    }
    if (caution.value && !confirmed.value) {
      confirmed.value = true
      return false
    }
    saving.value = true
    try {
      const pair = await store.createPair({ recordIds: ids, ...(name.trim() ? { name: name.trim() } : {}) })
      notify(`Pair “${pair.name}” saved.`)
      return true
    } catch (err) {
      message.value = messageFor(err)
      return false
    } finally {
      saving.value = false
    }
  }

  return { caution, confirmed, saving, message, save }
}
