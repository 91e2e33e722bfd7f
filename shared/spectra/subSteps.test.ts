import { describe, expect, it } from 'vitest'
import {
  MAX_SUB_STEPS,
  PEAK_PICKING_BOUND,
  chooseSubSteps,
  peakPickingBound,
  quantiseSubSteps,
} from './subSteps.js'

describe('sub-step rule', () => {
  it('rounds counts up to 1–8 or 8, 10, 12, 14 times a power of two', () => {
    expect([1, 5, 8, 9, 11, 13, 15, 17, 100].map(quantiseSubSteps)).toEqual([
      1, 5, 8, 10, 12, 14, 16, 20, 112,
    ])
  })

  it('gives at least 64 steps per period: a sinusoid under-reads by at most 1 − cos(π/64) ≈ 0.12%', () => {
    expect(PEAK_PICKING_BOUND).toBeCloseTo(0.0012, 4)
    for (const periodS of [0.01, 0.033, 0.1, 0.32]) {
      const { subSteps } = chooseSubSteps('piecewise-exact', periodS, 0.05, 0.005, 40)
      expect(periodS / (0.005 / subSteps)).toBeGreaterThanOrEqual(64)
    }
  })

  it('adds sub-steps for Newmark where period error accumulates: low damping and long records', () => {
    const short = chooseSubSteps('newmark-average', 0.1, 0.05, 0.005, 10).subSteps
    const long = chooseSubSteps('newmark-average', 0.1, 0.05, 0.005, 100).subSteps
    const undamped = chooseSubSteps('newmark-average', 0.1, 0, 0.005, 100).subSteps
    const exact = chooseSubSteps('piecewise-exact', 0.1, 0, 0.005, 100).subSteps
    expect(long).toBeGreaterThanOrEqual(short)
    expect(undamped).toBeGreaterThan(long)
    expect(exact).toBeLessThan(undamped)
  })

  it('stops at the cap and says so', () => {
    const choice = chooseSubSteps('newmark-average', 0.01, 0, 0.02, 2000)
    expect(choice.subSteps).toBe(MAX_SUB_STEPS)
    expect(choice.capped).toBe(true)
  })

  it('bounds peaks between steps by the sinusoid rule when the forcing is gentle, and more when it is sharp', () => {
    const base = {
      periodS: 1,
      dampingRatio: 0,
      stepS: 1 / 64,
      sdM: 1,
      svMPerS: 2 * Math.PI,
      saMPerS2: (2 * Math.PI) ** 2,
      pgaMPerS2: 0,
      maxSlopeMPerS3: 0,
    }
    // Pure free vibration: the true under-read is (ωh)²/8 ≈ 1 − cos(ωh/2); the bound, built from
    // the separate peaks of |u| and |v| and raised 1%, is at most √2·1.01 times that.
    const sinusoid = ((2 * Math.PI) / 64) ** 2 / 8
    expect(peakPickingBound(base)).toBeGreaterThanOrEqual(sinusoid)
    expect(peakPickingBound(base)).toBeLessThanOrEqual(Math.SQRT2 * 1.01 * sinusoid * (1 + 1e-12))
    expect(peakPickingBound({ ...base, maxSlopeMPerS3: 10_000 })).toBeGreaterThan(10 * peakPickingBound(base))
  })
})
