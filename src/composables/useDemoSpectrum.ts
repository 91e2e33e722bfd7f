import { onBeforeUnmount, ref, shallowRef } from 'vue'
import type { DemoSpectrumResult } from '@/workers/computeDemoSpectrum'

type WorkerReply = { ok: true; result: DemoSpectrumResult } | { ok: false; message: string }

/**
 * The demo record's spectrum, computed in a browser worker so the page stays
 * responsive. `compute()` may be called again (e.g. another damping ratio);
 * the worker ends with the component.
 */
export function useDemoSpectrum() {
  const result = shallowRef<DemoSpectrumResult | null>(null)
  const loading = ref(false)
  const error = ref<string | null>(null)
  let worker: Worker | null = null

  function compute(dampingRatio = 0.05): void {
    worker ??= new Worker(new URL('../workers/demoSpectrum.worker.ts', import.meta.url), { type: 'module' })
    loading.value = true
    error.value = null
    worker.onmessage = (event: MessageEvent<WorkerReply>) => {
      loading.value = false
      if (event.data.ok) result.value = event.data.result
      else error.value = event.data.message
    }
    worker.onerror = (event) => {
      loading.value = false
      error.value = `The spectrum could not be computed in this browser (${event.message || 'worker failed to start'}).`
    }
    worker.postMessage({ dampingRatio })
  }

  onBeforeUnmount(() => {
    worker?.terminate()
    worker = null
  })

  return { result, loading, error, compute }
}
