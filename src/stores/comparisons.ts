import { defineStore } from 'pinia'
import { ref } from 'vue'
import { ApiError } from '@/api/client'
import * as comparisonsApi from '@/api/comparisons'
import type {
  ComparisonSummary,
  ComparisonView,
  CreateComparisonBody,
  UpdateComparisonBody,
} from '@/api/comparisons'
import { useErrorReporter } from '@/composables/useErrorReporter'

/**
 * The firm's comparisons: the list (with review states) and the one open in the workspace.
 * Saving throws on failure (400, 409) so the workspace can say why beside its form.
 */
export const useComparisonsStore = defineStore('comparisons', () => {
  const items = ref<ComparisonSummary[]>([])
  const current = ref<ComparisonView | null>(null)
  const loading = ref(false)
  const loadingCurrent = ref(false)
  const saving = ref(false)
  const error = ref<string | null>(null)
  const { report } = useErrorReporter()

  async function load(): Promise<void> {
    loading.value = true
    error.value = null
    try {
      items.value = await comparisonsApi.listComparisons()
    } catch (err) {
      error.value = report(err, 'Could not load the comparisons')
    } finally {
      loading.value = false
    }
  }

  async function open(id: string): Promise<void> {
    loadingCurrent.value = true
    error.value = null
    current.value = null
    try {
      current.value = await comparisonsApi.getComparison(id)
    } catch (err) {
      error.value = report(err, 'Could not open the comparison')
    } finally {
      loadingCurrent.value = false
    }
  }

  async function save(run: () => Promise<ComparisonView>): Promise<ComparisonView> {
    saving.value = true
    error.value = null
    try {
      const view = await run()
      current.value = view
      items.value = [view.comparison, ...items.value.filter((c) => c.id !== view.comparison.id)]
      return view
    } catch (err) {
      error.value = err instanceof ApiError ? err.message : report(err)
      throw err
    } finally {
      saving.value = false
    }
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
    saving,
    error,
    load,
    open,
    create,
    update,
    setReviewState,
  }
})
