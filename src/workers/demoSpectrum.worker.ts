/**
 * Browser worker for the Overview: computes the demo record's spectrum off the
 * page's thread. The message is checked at this edge; the work is shared code.
 */
import '../zodJitless'
import { z } from 'zod'
import { MAX_DAMPING_RATIO } from '../../shared/spectra/computeSpectrum'
import { computeDemoSpectrum, transferablesOf } from './computeDemoSpectrum'

const requestSchema = z.object({ dampingRatio: z.number().min(0).lt(MAX_DAMPING_RATIO) })

self.onmessage = (event: MessageEvent<unknown>) => {
  const request = requestSchema.safeParse(event.data)
  if (!request.success) {
    self.postMessage({
      ok: false,
      message: `Bad request to the spectrum worker: ${request.error.issues[0]?.message ?? ''}`,
    })
    return
  }
  try {
    const result = computeDemoSpectrum(request.data.dampingRatio)
    self.postMessage({ ok: true, result }, { transfer: transferablesOf(result) })
  } catch (err) {
    self.postMessage({ ok: false, message: err instanceof Error ? err.message : String(err) })
  }
}
