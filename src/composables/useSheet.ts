import { type Ref, ref, watch } from 'vue'
import type { Sheet } from '../../shared/schemas/sheets'
import { type ExportSubject, getSheet } from '@/api/exports'
import { useErrorReporter } from '@/composables/useErrorReporter'

/** Loads the sheet of a run or comparison, again whenever the id changes. */
export function useSheet(subject: Ref<ExportSubject>, id: Ref<string>) {
  const sheet = ref<Sheet | null>(null)
  const loading = ref(false)
  const error = ref<string | null>(null)
  const { report } = useErrorReporter()
  let controller: AbortController | null = null

  async function load() {
    controller?.abort()
    controller = new AbortController()
    loading.value = true
    error.value = null
    try {
      sheet.value = await getSheet(subject.value, id.value, controller.signal)
    } catch (err) {
      if (err instanceof DOMException && err.name === 'AbortError') return
      sheet.value = null
      error.value = report(err, 'The sheet could not be loaded')
    } finally {
      loading.value = false
    }
  }

  watch([subject, id], load, { immediate: true })
  return { sheet, loading, error, reload: load }
}
