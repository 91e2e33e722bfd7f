import { describe, expect, it } from 'vitest'
import { freeVibration, freeVibrationTailPeaks } from './freeVibration.js'

describe('free vibration', () => {
  it('satisfies the equation of motion: finite-difference check of Chopra eq. 2.2.4', () => {
    const omega = 3
    const zeta = 0.1
    const h = 1e-4
    for (const t of [0.2, 1.1, 2.9]) {
      const before = freeVibration(0.4, 1.3, omega, zeta, t - h)
      const now = freeVibration(0.4, 1.3, omega, zeta, t)
      const after = freeVibration(0.4, 1.3, omega, zeta, t + h)
      const accel = (after.u - 2 * now.u + before.u) / (h * h)
      expect(accel + 2 * zeta * omega * now.v + omega * omega * now.u).toBeCloseTo(0, 5)
      expect((after.u - before.u) / (2 * h) - now.v).toBeCloseTo(0, 7)
    }
  })

  it('the closed-form tail peaks equal the largest values found by sampling the free vibration finely', () => {
    for (const zeta of [0, 0.05, 0.3, 0.49]) {
      for (const [u0, v0] of [
        [1, 0],
        [0, 1],
        [-0.3, 2.2],
        [0.8, -5],
      ] as const) {
        const omega = 2.5
        const peaks = freeVibrationTailPeaks(u0, v0, omega, zeta)
        let u = 0
        let v = 0
        let a = 0
        const period = (2 * Math.PI) / (omega * Math.sqrt(1 - zeta * zeta))
        for (let i = 1; i <= 20_000; i++) {
          const t = (i / 20_000) * 2 * period
          const state = freeVibration(u0, v0, omega, zeta, t)
          u = Math.max(u, Math.abs(state.u))
          v = Math.max(v, Math.abs(state.v))
          a = Math.max(a, Math.abs(2 * zeta * omega * state.v + omega * omega * state.u))
        }
        // Sampling at 10,000 points per period under-reads by at most 1 − cos(π/10⁴) ≈ 5e-8.
        expect(Math.max(peaks.u.value, Math.abs(u0))).toBeCloseTo(Math.max(u, Math.abs(u0)), 6)
        expect(Math.max(peaks.v.value, Math.abs(v0))).toBeCloseTo(Math.max(v, Math.abs(v0)), 6)
        const a0 = Math.abs(2 * zeta * omega * v0 + omega * omega * u0)
        expect(Math.max(peaks.a.value, a0)).toBeCloseTo(Math.max(a, a0), 5)
        expect(peaks.u.timeS).toBeGreaterThan(0)
        expect(peaks.u.timeS).toBeLessThanOrEqual(period / 2 + 1e-12)
      }
    }
  })
})
