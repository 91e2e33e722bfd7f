import { demoRecord, type DemoRecord } from '../demo/demoRecords.js'
import { parseRecord } from '../parseRecord.js'
import { STANDARD_GRAVITY_M_PER_S2 } from '../units.js'
import type { ProcessingSettings } from './processRecord.js'

/** Offset and drift added to the demo record, in g and g/s (demo data, chosen to show the feature). */
const OFFSET_G = 0.0008
const DRIFT_G_PER_S = 0.00002

/**
 * A synthetic demo record with a pre-event offset and a linear baseline drift: the far-field demo
 * record plus OFFSET_G + DRIFT_G_PER_S·t, written in g with a header. Integrated twice, its
 * displacement runs away, as in an uncorrected recording; the demo's processed child removes it.
 */
export function driftingDemoRecord(): DemoRecord {
  const base = demoRecord('synthetic-far-field')
  const { accelMPerS2, dtS } = parseRecord(base.text)
  const values = Array.from(
    accelMPerS2,
    (a, i) => a / STANDARD_GRAVITY_M_PER_S2 + OFFSET_G + DRIFT_G_PER_S * i * dtS,
  )
  return {
    id: 'synthetic-drifting',
    name: 'Synthetic far-field with baseline drift',
    description:
      'Synthetic record (not a recording): the far-field demo record with a pre-event offset of 0.0008 g and a drift of 0.00002 g/s added, to show baseline correction and filtering.',
    synthetic: true,
    fileName: 'synthetic-drifting.txt',
    points: values.length,
    dtS,
    text:
      [
        '# Ordinate demo record: synthetic far-field with baseline drift (synthetic, not a recording)',
        `# points: ${values.length}`,
        `# dt = ${dtS} s`,
        '# units: g',
        ...values.map((v) => v.toExponential(6)),
      ].join('\n') + '\n',
  }
}

/** The processing of the demo's child record: order-1 baseline, then a zero-phase high-pass with kept pads. */
export const DEMO_PROCESSING: ProcessingSettings = {
  baseline: { order: 1 },
  taperS: 0.5,
  highPass: { hz: 0.1, order: 4 },
  lowPass: { hz: 40, order: 4 },
  phase: 'zero',
  pads: 'keep',
}
