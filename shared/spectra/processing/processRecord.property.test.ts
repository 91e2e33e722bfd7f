import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { processRecord, type ProcessingSettings } from './processRecord.js'
import { fourierSpectrum } from './fourierSpectrum.js'

// Properties of the processing chain, checked with fast-check on random records and settings.
const dtS = 0.01

const recordArb = fc
  .array(fc.double({ min: -20, max: 20, noNaN: true, noDefaultInfinity: true }), {
    minLength: 64,
    maxLength: 600,
  })
  .map((v) => Float64Array.from(v))

const settingsArb: fc.Arbitrary<ProcessingSettings> = fc.record(
  {
    baseline: fc.option(fc.record({ order: fc.integer({ min: 0, max: 3 }) }), { nil: null }),
    taperS: fc.option(fc.double({ min: 0, max: 0.15, noNaN: true }), { nil: null }),
    highPass: fc.option(
      fc.record({ hz: fc.double({ min: 0.5, max: 5, noNaN: true }), order: fc.integer({ min: 1, max: 8 }) }),
      { nil: null },
    ),
    lowPass: fc.option(
      fc.record({ hz: fc.double({ min: 6, max: 49, noNaN: true }), order: fc.integer({ min: 1, max: 8 }) }),
      { nil: null },
    ),
    phase: fc.constantFrom('zero' as const, 'causal' as const),
  },
  { requiredKeys: [] },
)

describe('processRecord properties', () => {
  it('never produces NaN or Infinity, in the record or its Fourier spectrum', () => {
    fc.assert(
      fc.property(recordArb, settingsArb, (a, s) => {
        const out = processRecord(a, dtS, s)
        expect(out.accelMPerS2.every(Number.isFinite)).toBe(true)
        const f = fourierSpectrum(out.accelMPerS2, dtS, 20)
        expect(f.smoothedMPerS.every(Number.isFinite) && f.rawMPerS.every(Number.isFinite)).toBe(true)
      }),
      { numRuns: 60 },
    )
  })

  it('is linear in the input: P(αx + βy) = αP(x) + βP(y) to round-off', () => {
    fc.assert(
      fc.property(
        recordArb,
        fc.double({ min: -3, max: 3, noNaN: true }),
        fc.double({ min: -3, max: 3, noNaN: true }),
        settingsArb,
        (x, alpha, beta, s) => {
          const y = Float64Array.from(x, (v, i) => Math.cos(i) * 5 - v / 2)
          const mix = Float64Array.from(x, (v, i) => alpha * v + beta * y[i]!)
          const px = processRecord(x, dtS, s).accelMPerS2
          const py = processRecord(y, dtS, s).accelMPerS2
          const pm = processRecord(mix, dtS, s).accelMPerS2
          let scale = 1e-300
          for (let i = 0; i < px.length; i++)
            scale = Math.max(scale, Math.abs(alpha * px[i]!), Math.abs(beta * py[i]!))
          for (let i = 0; i < pm.length; i++)
            expect(Math.abs(pm[i]! - (alpha * px[i]! + beta * py[i]!))).toBeLessThanOrEqual(1e-9 * scale)
        },
      ),
      { numRuns: 60 },
    )
  })

  it("leaves the original's bytes unchanged", () => {
    fc.assert(
      fc.property(recordArb, settingsArb, (a, s) => {
        const before = new Uint8Array(a.buffer.slice(0))
        processRecord(a, dtS, s)
        expect(new Uint8Array(a.buffer)).toEqual(before)
      }),
      { numRuns: 60 },
    )
  })
})
