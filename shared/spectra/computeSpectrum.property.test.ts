import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { type SpectrumComputation, computeSpectrum } from './computeSpectrum.js'
import { SPECTRUM_METHODS } from './oscillatorRecurrence.js'

/**
 * Property-based checks of the engine (fast-check) on random short records: finite input gives
 * finite, non-negative ordinates, and the spectrum of k·a(t) is k times the spectrum of a(t).
 * Records and sweeps are kept short and numRuns modest so the suite stays fast.
 */
const RUNS = 40

const QUANTITIES = ['sdM', 'svMPerS', 'saMPerS2', 'psvMPerS', 'psaMPerS2'] as const

/**
 * A random short record: finite accelerations up to 100 m/s² (about 10 g), with spikes, zeros and
 * steps. Values below 1e-9 m/s² become 0: subnormal numbers round to absolute, not relative,
 * steps, which the scaling check below would misread (extreme magnitudes have their own check).
 */
const record = fc.record({
  accelMPerS2: fc
    .array(fc.oneof(fc.double({ min: -100, max: 100, noNaN: true }), fc.constant(0)), {
      minLength: 2,
      maxLength: 300,
    })
    .map((values) => Float64Array.from(values, (v) => (Math.abs(v) < 1e-9 ? 0 : v))),
  dtS: fc.double({ min: 0.001, max: 0.05, noNaN: true }),
})

const settings = fc.record({
  dampingRatios: fc.uniqueArray(fc.double({ min: 0, max: 0.49, noNaN: true }), {
    minLength: 1,
    maxLength: 3,
  }),
  periodsS: fc.uniqueArray(fc.double({ min: 0.01, max: 20, noNaN: true }), { minLength: 1, maxLength: 6 }),
  method: fc.constantFrom(...SPECTRUM_METHODS),
})

function expectFinite(result: SpectrumComputation) {
  for (const curve of result.curves) {
    for (const q of QUANTITIES) {
      for (const value of curve[q]) {
        expect(Number.isFinite(value), `${q} = ${value}`).toBe(true)
        expect(value).toBeGreaterThanOrEqual(0)
      }
    }
  }
}

describe('computeSpectrum (property-based)', () => {
  it('never answers NaN (or an infinite or negative peak) for finite input', () => {
    fc.assert(
      fc.property(record, settings, (r, s) => expectFinite(computeSpectrum(r, s))),
      { numRuns: RUNS },
    )
  })

  it('never answers NaN for finite input of extreme magnitude (1e-300 to 1e100 m/s²)', () => {
    const extreme = fc.record({
      accelMPerS2: fc
        .array(
          fc.oneof(
            fc.double({ min: -1e100, max: 1e100, noNaN: true }),
            fc.double({ min: -1e-300, max: 1e-300, noNaN: true }),
          ),
          {
            minLength: 2,
            maxLength: 100,
          },
        )
        .map((values) => Float64Array.from(values)),
      dtS: fc.double({ min: 0.001, max: 0.05, noNaN: true }),
    })
    fc.assert(
      fc.property(extreme, settings, (r, s) => {
        for (const curve of computeSpectrum(r, s).curves) {
          for (const q of QUANTITIES) for (const value of curve[q]) expect(Number.isNaN(value), q).toBe(false)
        }
      }),
      { numRuns: RUNS },
    )
  })

  it('scales PSA (and every other ordinate) by k when the record is scaled by k (the oscillator is linear)', () => {
    fc.assert(
      fc.property(record, settings, fc.double({ min: 1e-3, max: 1e3, noNaN: true }), (r, s, k) => {
        const base = computeSpectrum(r, s)
        const scaled = computeSpectrum({ accelMPerS2: r.accelMPerS2.map((a) => k * a), dtS: r.dtS }, s)
        base.curves.forEach((curve, c) => {
          for (const q of QUANTITIES) {
            const peak = Math.max(...curve[q])
            curve[q].forEach((value, p) => {
              const got = scaled.curves[c]![q][p]!
              // Linear in exact arithmetic; rounding of k·a and of each step leaves ~1e-15 per
              // operation, so 1e-9 of the curve's peak is tight yet clear of round-off.
              expect(Math.abs(got - k * value), `${q} at ${s.periodsS[p]} s`).toBeLessThanOrEqual(
                1e-9 * k * peak,
              )
            })
          }
        })
      }),
      { numRuns: RUNS },
    )
  })
})
