import type { ProcessingSettings } from './processRecord.js'
import { designFilters } from './processRecord.js'
import { sosGain } from './butterworthSos.js'

/**
 * The gain of the settings' filters at each frequency: Π|H_i(f)| for causal filtering and
 * Π|H_i(f)|² for zero phase (forward and backward). 1 everywhere when there is no filter.
 */
export function filterGain(
  settings: ProcessingSettings,
  dtS: number,
  frequencyHz: Float64Array,
): Float64Array {
  const filters = designFilters(settings, dtS)
  const squared = (settings.phase ?? 'zero') === 'zero'
  const out = new Float64Array(frequencyHz.length)
  for (let j = 0; j < frequencyHz.length; j++) {
    let g = 1
    for (const f of filters) g *= sosGain(f, frequencyHz[j]!)
    out[j] = squared ? g * g : g
  }
  return out
}
