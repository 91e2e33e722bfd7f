import { onScopeDispose, ref } from 'vue'
import { ApiError } from '@/api/client'
import { useErrorReporter } from '@/composables/useErrorReporter'

/**
 * A preview asked of the server as inputs change: asked once they rest for `delayMs`, the
 * previous request aborted when a newer one starts (so a late answer never overwrites a newer
 * one), `busy` while one is out, and the server's message in `problem` when it refuses (it names
 * the field or CSV line at fault). Other failures go through the one reporter.
 */
export function useLivePreview(delayMs: number) {
  const busy = ref(false)
  const problem = ref<string | null>(null)
  const { report } = useErrorReporter()
  let timer: ReturnType<typeof setTimeout> | undefined
  let controller: AbortController | undefined

  async function run(ask: (signal: AbortSignal) => Promise<void>, onFail?: () => void) {
    controller?.abort()
    const mine = new AbortController()
    controller = mine
    problem.value = null
    busy.value = true
    try {
      await ask(mine.signal)
    } catch (err) {
      if (err instanceof DOMException && err.name === 'AbortError') return
      onFail?.()
      problem.value = err instanceof ApiError ? err.message : report(err)
    } finally {
      if (controller === mine) busy.value = false
    }
  }

  /** Asks after the inputs rest; `ask` stores the answer, `onFail` clears what a failure leaves stale. */
  function schedule(ask: (signal: AbortSignal) => Promise<void>, onFail?: () => void) {
    clearTimeout(timer)
    timer = setTimeout(() => void run(ask, onFail), delayMs)
  }

  function cancel() {
    clearTimeout(timer)
    controller?.abort()
  }
  onScopeDispose(cancel)

  return { busy, problem, schedule, cancel }
}
