import { describe, expect, it } from 'vitest'
import { integrateRecord, recordParameters, recordWarnings, standardizedCav } from './recordParameters.js'

const G = 9.80665 // standard gravity, m/s² (3rd CGPM, 1901)

function sampled(f: (t: number) => number, dtS: number, points: number): Float64Array {
  return Float64Array.from({ length: points }, (_, i) => f(i * dtS))
}

describe('integrateRecord', () => {
  it('integrates a constant acceleration exactly: v = a·t, d = a·t²/2 (trapezoidal rule is exact for these)', () => {
    const { velMPerS, dispM } = integrateRecord(new Float64Array(101).fill(2), 0.01)
    expect(velMPerS[100]).toBeCloseTo(2, 12)
    expect(dispM[100]).toBeCloseTo(1, 12)
  })

  it('integrates a ramp a = t exactly at the samples: v = t²/2, d = t³/6 (closed form)', () => {
    const { velMPerS, dispM } = integrateRecord(
      Float64Array.from({ length: 11 }, (_, i) => i * 0.1),
      0.1,
    )
    expect(velMPerS[10]).toBeCloseTo(0.5, 12)
    expect(dispM[10]).toBeCloseTo(1 / 6, 12)
  })
})

describe('PGV and PGD between samples (the record linear between samples, closed form)', () => {
  it('PGV is the peak of the quadratic velocity: a = 1 → −1 over 1 s gives v = τ − τ², peak 1/4', () => {
    // At the samples v is 0 and 0; the interpolant peaks at τ = 1/2.
    expect(recordParameters(Float64Array.from([1, -1]), 1).pgvMPerS).toBeCloseTo(0.25, 12)
  })

  it('PGD is the peak of the cubic displacement: a = 2 → −4 over 1 s gives d = τ² − τ³, peak 4/27', () => {
    // v = 2τ − 3τ² vanishes at τ = 2/3; at the samples d is 0 and 0.
    expect(recordParameters(Float64Array.from([2, -4]), 1).pgdM).toBeCloseTo(4 / 27, 12)
  })
})

describe('standardizedCav (EPRI 1991, from memory: 1 s windows whose peak reaches 0.025 g)', () => {
  const dtS = 0.01
  it('counts every window of a motion above the threshold, and equals the plain ∫|a| dt then', () => {
    const strong = new Float64Array(251).fill(0.03 * G)
    expect(standardizedCav(strong, dtS)).toBeCloseTo(recordParameters(strong, dtS).cavMPerS, 9)
  })

  it('counts no window of a motion below 0.025 g, and only the windows that reach it', () => {
    expect(standardizedCav(new Float64Array(251).fill(0.02 * G), dtS)).toBe(0)
    // 0.05 g up to 0.99 s, then 0.01 g: only the first window counts, its ∫|a| dt being
    // 0.99 s × 0.05 g plus the last interval's mean 0.03 g × 0.01 s = 0.0498 g·s.
    const mixed = Float64Array.from({ length: 301 }, (_, i) => (i < 100 ? 0.05 : 0.01) * G)
    expect(standardizedCav(mixed, dtS)).toBeCloseTo(0.0498 * G, 9)
  })
})

describe('recordParameters', () => {
  // A sine of amplitude A = 3 m/s² and period P = 0.5 s lasting 20 whole cycles (Td = 10 s),
  // sampled 400 times per cycle. Linear interpolation between samples departs from the sine by
  // at most (ωΔt)²/8 = 3.1e-5 of A, which bounds the discretisation error of the integrals below.
  const A = 3
  const P = 0.5
  const omega = (2 * Math.PI) / P
  const dtS = P / 400
  const Td = 20 * P
  const sine = sampled((t) => A * Math.sin(omega * t), dtS, 8001)
  const params = recordParameters(sine, dtS)

  it('Arias intensity of a sine of whole cycles is πA²Td/(4g) (Arias 1970, closed form)', () => {
    expect(params.ariasMPerS / ((Math.PI * A * A * Td) / (4 * G)) - 1).toBeCloseTo(0, 4)
  })

  it('D5-95 of a steady sine of 20 cycles is 0.9·Td (Trifunac & Brady 1975; 5% and 95% fall on whole cycles)', () => {
    expect(Math.abs(params.d595S - 0.9 * Td)).toBeLessThan(dtS)
  })

  it('CAV of a sine of whole cycles is 2A·Td/π (mean of |sin| is 2/π)', () => {
    expect(params.cavMPerS / ((2 * A * Td) / Math.PI) - 1).toBeCloseTo(0, 4)
  })

  it('PGA, PGV and PGD of a sine from rest: A, 2A/ω, and the drift A·Td/ω at the end', () => {
    expect(params.pgaMPerS2).toBeCloseTo(A, 9)
    // v = (A/ω)(1 − cos ωt) peaks at 2A/ω; d = (A/ω)(t − sin(ωt)/ω) ends at A·Td/ω.
    expect(params.pgvMPerS / ((2 * A) / omega) - 1).toBeCloseTo(0, 4)
    expect(params.pgdM / ((A * Td) / omega) - 1).toBeCloseTo(0, 4)
    expect(params.points).toBe(8001)
    expect(params.durationS).toBeCloseTo(Td, 12)
  })

  it('a silent record has zero intensity and zero significant duration', () => {
    const silent = recordParameters(new Float64Array(100), 0.01)
    expect(silent.ariasMPerS).toBe(0)
    expect(silent.d595S).toBe(0)
    expect(silent.cavMPerS).toBe(0)
  })

  it('rejects a non-positive time step', () => {
    expect(() => recordParameters(sine, 0)).toThrow(RangeError)
  })
})

describe('recordWarnings', () => {
  const dtS = 0.005
  // a = A[sin ωt − 2 sin 2ωt] over whole cycles starts at 0 and returns ground velocity
  // (A/ω)(cos 2ωt − cos ωt) and displacement to zero: a clean record.
  const omega = 2 * Math.PI
  const clean = sampled((t) => Math.sin(omega * t) - 2 * Math.sin(2 * omega * t), dtS, 2001)

  it('has nothing to say about a record that starts at zero and returns to rest', () => {
    expect(recordWarnings(clean, dtS)).toEqual([])
  })

  it('warns about residual velocity and displacement drift from a baseline offset', () => {
    const offset = clean.map((a) => a + 0.05)
    const warnings = recordWarnings(offset, dtS)
    expect(warnings.some((w) => w.includes('velocity ends'))).toBe(true)
    expect(warnings.some((w) => w.includes('drifts'))).toBe(true)
  })

  it('warns when the record starts far from zero', () => {
    const late = clean.subarray(50)
    expect(recordWarnings(late, dtS).some((w) => w.includes('starts at'))).toBe(true)
  })
})
