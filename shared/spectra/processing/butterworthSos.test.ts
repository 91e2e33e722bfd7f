import { describe, expect, it } from 'vitest'
import { butterworthSos, sosGain } from './butterworthSos.js'
import { sosFilterInPlace, sosFilterZeroPhaseInPlace } from './sosFilter.js'
import fixtures from './fixtures/scipyButterworth.json' with { type: 'json' }

// Reference values from scipy.signal 1.x (butter with output="sos", its frequency response, and
// sosfilt), generated once by scripts/processingFixtures.py; the scipy version is in the JSON.
const dtS = 1 / fixtures.sampleRateHz

function maxAbs(x: ArrayLike<number>): number {
  let m = 0
  for (let i = 0; i < x.length; i++) m = Math.max(m, Math.abs(x[i]!))
  return m
}

describe('butterworthSos against scipy.signal.butter(n, fc, btype, fs, output="sos")', () => {
  for (const ref of fixtures.gains) {
    const kind = ref.kind as 'highpass' | 'lowpass'
    it(`${kind} order ${ref.order}: one-pass gain at fc/2, fc and 2fc agree to 1e-12`, () => {
      const f = butterworthSos(kind, ref.order, ref.cornerHz, dtS)
      expect(Math.abs(sosGain(f, ref.cornerHz / 2) - ref.gainAtHalf)).toBeLessThan(1e-12)
      expect(Math.abs(sosGain(f, ref.cornerHz) - ref.gainAtCorner)).toBeLessThan(1e-12)
      expect(Math.abs(sosGain(f, 2 * ref.cornerHz) - ref.gainAtDouble)).toBeLessThan(1e-12)
    })
  }

  it('the corner gain is 1/√2 for one pass and 1/2 for zero phase (Butterworth 1930: |H(fc)|² = 1/2)', () => {
    for (const order of [2, 4, 8]) {
      for (const kind of ['highpass', 'lowpass'] as const) {
        const g = sosGain(butterworthSos(kind, order, 3, dtS), 3)
        expect(g).toBeCloseTo(Math.SQRT1_2, 12)
        expect(g * g).toBeCloseTo(0.5, 12)
      }
    }
  })

  it('refuses an order outside 1–8 and a corner at or above Nyquist', () => {
    expect(() => butterworthSos('lowpass', 0, 1, dtS)).toThrow(RangeError)
    expect(() => butterworthSos('lowpass', 9, 1, dtS)).toThrow(RangeError)
    expect(() => butterworthSos('lowpass', 2, 50, dtS)).toThrow(RangeError)
  })
})

describe('sosFilter against scipy.signal.sosfilt on a fixed random record', () => {
  const record = Float64Array.from(fixtures.record)
  for (const run of fixtures.runs) {
    const kind = run.kind as 'highpass' | 'lowpass'
    const filter = butterworthSos(kind, run.order, run.cornerHz, dtS)
    const scale = maxAbs(run.zeroPhase)

    it(`${kind} order ${run.order} at ${run.cornerHz} Hz, causal: agrees to 1e-11 of the peak`, () => {
      const y = Float64Array.from(record)
      sosFilterInPlace(filter, y)
      let err = 0
      for (let i = 0; i < y.length; i++) err = Math.max(err, Math.abs(y[i]! - run.causal[i]!))
      expect(err / maxAbs(run.causal)).toBeLessThan(1e-11)
    })

    it(`${kind} order ${run.order} at ${run.cornerHz} Hz, forward then backward from rest: agrees to 1e-11 of the peak`, () => {
      const y = Float64Array.from(record)
      sosFilterZeroPhaseInPlace(filter, y)
      let err = 0
      for (let i = 0; i < y.length; i++) err = Math.max(err, Math.abs(y[i]! - run.zeroPhase[i]!))
      expect(err / scale).toBeLessThan(1e-11)
    })
  }
})
