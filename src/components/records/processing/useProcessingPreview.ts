import { type Ref, onBeforeUnmount, ref, watch } from 'vue'
import { ApiError } from '@/api/client'
import {
  type ProcessingPreview,
  type ProcessingSettingsBody,
  previewProcessing,
} from '@/api/recordProcessing'

/** Pause after the last change before asking for a preview, ms. */
export const PREVIEW_DEBOUNCE_MS = 350

/**
 * A live preview of the settings: asks the server again a moment after the last change, aborts
 * the request it replaces, and drops any answer that is not for the latest settings (so a slow
 * answer can never overwrite a newer one). `settings` null means "do not ask" (the form has
 * problems of its own).
 */
export function useProcessingPreview(recordId: Ref<string>, settings: Ref<ProcessingSettingsBody | null>) {
  const preview = ref<ProcessingPreview | null>(null)
  const loading = ref(false)
  const error = ref<ApiError | null>(null)
  /** Bumped on every request; an answer counts only while its number is the latest. */
  let generation = 0
  let timer: ReturnType<typeof setTimeout> | undefined
  let inFlight: AbortController | null = null

  async function run(id: string, body: ProcessingSettingsBody) {
    const mine = ++generation
    inFlight?.abort()
    const controller = new AbortController()
    inFlight = controller
    loading.value = true
    try {
      const answer = await previewProcessing(id, body, controller.signal)
      if (mine !== generation) return
      preview.value = answer
      error.value = null
    } catch (err) {
      if (mine !== generation) return
      if (err instanceof DOMException && err.name === 'AbortError') return
      error.value = err instanceof ApiError ? err : new ApiError(0, 'network', String(err))
    } finally {
      if (mine === generation) {
        loading.value = false
        inFlight = null
      }
    }
  }

  watch(
    [recordId, settings],
    ([id, body]) => {
      clearTimeout(timer)
      if (body === null) {
        generation++
        inFlight?.abort()
        loading.value = false
        return
      }
      const snapshot = JSON.parse(JSON.stringify(body)) as ProcessingSettingsBody
      timer = setTimeout(() => void run(id, snapshot), PREVIEW_DEBOUNCE_MS)
    },
    { deep: true, immediate: true },
  )

  onBeforeUnmount(() => {
    clearTimeout(timer)
    generation++
    inFlight?.abort()
  })

  return { preview, loading, error }
}
