import { describe, expect, it } from 'vitest'
import { buildFourierChart } from '../../charts/fourierChart.js'
import type { RecordProcessing } from '../../schemas/processing.js'
import { describeProcessing, usableBandCaution, usableBandCautionFor } from './describeProcessing.js'

const step = {
  baseline: { order: 1 },
  taperS: 0.5,
  highPass: { hz: 0.1, order: 4 },
  lowPass: null,
  phase: 'zero' as const,
  pads: 'keep' as const,
  padS: 30,
  sourceSha256: 'a'.repeat(64),
}
const processing: RecordProcessing = {
  ...step,
  parentSha256: 'a'.repeat(64),
  usablePeriodMaxS: 8,
  chain: [step],
}

describe('describeProcessing', () => {
  it('says that nothing was applied to a record as received', () => {
    expect(describeProcessing(null, 'g')).toBe(
      'Record as received: read in g and converted to m/s² (g = 9.80665 m/s²); no baseline correction or filtering applied by Ordinate.',
    )
    expect(describeProcessing(null, 'm/s2')).toMatch(/^Record as received: read in m\/s²; no baseline/)
  })

  it('names every step, the original hash, the pads and the usable band', () => {
    expect(describeProcessing(processing, 'g')).toBe(
      `Processed by Ordinate from the original (SHA-256 ${'a'.repeat(64)}, read in g and converted to m/s² (g = 9.80665 m/s²)): least-squares baseline of order 1 removed; cosine taper of 0.5 s at each end; Butterworth high-pass 0.1 Hz order 4 (zero phase, forward then backward from rest); zero pads of 30 s at each end kept with the record. Usable periods up to 8 s (1/(1.25·f_hp)).`,
    )
  })

  it('numbers the steps of a chain and states the parent hash', () => {
    const second = {
      ...step,
      baseline: null,
      taperS: null,
      highPass: null,
      lowPass: { hz: 20, order: 2 },
      phase: 'causal' as const,
      pads: null,
      padS: 0,
      sourceSha256: 'b'.repeat(64),
    }
    const text = describeProcessing(
      { ...second, parentSha256: 'b'.repeat(64), usablePeriodMaxS: 8, chain: [step, second] },
      'm/s2',
    )
    expect(text).toMatch(
      /step 1: least-squares baseline.*\. step 2: Butterworth low-pass 20 Hz order 2 \(causal, forward once from rest\)\./,
    )
    expect(text).toContain(`Parent record SHA-256 ${'b'.repeat(64)}.`)
  })
})

describe('usableBandCaution', () => {
  it('cautions only when the periods go past 1/(1.25·f_hp)', () => {
    expect(usableBandCaution(8, 10)).toMatch(/beyond 8 s/)
    expect(usableBandCaution(8, 8)).toBeNull()
    expect(usableBandCaution(null, 10)).toBeNull()
    expect(
      usableBandCautionFor(
        [{ processing }, { processing: { ...processing, usablePeriodMaxS: 4 } }],
        [0.1, 5],
      ),
    ).toMatch(/beyond 4 s/)
    expect(usableBandCautionFor([{ processing: null }], [0.1, 50])).toBeNull()
  })
})

describe('buildFourierChart', () => {
  it('draws the curves, the gain on its own axis and the corners, escaping the labels', () => {
    const f = Float64Array.from({ length: 50 }, (_, i) => 0.05 * 1.15 ** i)
    const svg = buildFourierChart({
      curves: [
        {
          label: 'A <raw>',
          frequencyHz: f,
          amplitudeMPerS: Float64Array.from(f, (x) => 1 / (1 + x)),
          colour: '#000',
        },
      ],
      gain: { frequencyHz: f, gain: Float64Array.from(f, (x) => x / (1 + x)) },
      corners: [{ label: 'High-pass', hz: 0.1 }],
    })
    expect(svg).toContain('A &lt;raw&gt;')
    expect(svg).toContain('Filter gain')
    expect(svg).toContain('High-pass 0.1 Hz')
    expect(svg).not.toContain('NaN')
  })
})
