import { defineStore } from 'pinia'
import { ref } from 'vue'
import * as comparisonsApi from '@/api/comparisons'
import type {
  ComparisonSummary,
  ComparisonView,
  CreateComparisonBody,
  UpdateComparisonBody,
} from '@/api/comparisons'
import { useRequestState } from '@/composables/useRequestState'

/**
 * The firm's comparisons: the list (with review states) and the one open in the workspace.
 * Saving throws on failure (400, 409) so the workspace can say why beside its form.
 */
export const useComparisonsStore = defineStore('comparisons', () => {
  const items = ref<ComparisonSummary[]>([])
  const current = ref<ComparisonView | null>(null)
  const loading = ref(false)
  const loadingCurrent = ref(false)
  /** The open comparison does not exist, or is another firm's. */
  const currentMissing = ref(false)
  const saving = ref(false)
  const { error, read, submit } = useRequestState()

  async function load(): Promise<void> {
    await read(loading, 'Could not load the comparisons', async () => {
      items.value = await comparisonsApi.listComparisons()
    })
  }

  async function open(id: string): Promise<void> {
    current.value = null
    await read(
      loadingCurrent,
      'Could not open the comparison',
      async () => {
        current.value = await comparisonsApi.getComparison(id)
      },
      { missing: currentMissing, id },
    )
  }

  function save(run: () => Promise<ComparisonView>): Promise<ComparisonView> {
    return submit(saving, async () => {
      const view = await run()
      current.value = view
      items.value = [view.comparison, ...items.value.filter((c) => c.id !== view.comparison.id)]
      return view
    })
  }

  const create = (body: CreateComparisonBody) => save(() => comparisonsApi.createComparison(body))
  const update = (id: string, body: UpdateComparisonBody) =>
    save(() => comparisonsApi.updateComparison(id, body))

  /** After a review action on the open comparison, its state in the list and workspace follows. */
  function setReviewState(id: string, reviewState: ComparisonSummary['reviewState']) {
    items.value = items.value.map((c) => (c.id === id ? { ...c, reviewState } : c))
    if (current.value?.comparison.id === id) {
      current.value = { ...current.value, comparison: { ...current.value.comparison, reviewState } }
    }
  }

  return {
    items,
    current,
    loading,
    loadingCurrent,
    currentMissing,
    saving,
    error,
    load,
    open,
    create,
    update,
    setReviewState,
  }
})
