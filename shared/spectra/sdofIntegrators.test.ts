import { describe, expect, it } from 'vitest'
import { harmonicResponse } from './closedForms.js'
import { freeVibration } from './freeVibration.js'
import { newmarkSdof, piecewiseExactSdof } from './sdofIntegrators.js'

/**
 * Chopra, Dynamics of Structures, ch. 5 worked example (values from memory,
 * recomputed; DOMAIN.md): m = 0.2533 kip·s²/in, k = 10 kip/in (Tn = 1 s), ζ = 5%,
 * p(t) = 10 sin(πt/0.6) kip for t ≤ 0.6 s, then 0.
 */
const m = 0.2533
const k = 10
const zeta = 0.05
const omega = Math.sqrt(k / m)
const pulse = (t: number) => (t <= 0.6 + 1e-12 ? 10 * Math.sin((Math.PI * t) / 0.6) : 0)
const force = (dtS: number, endS = 1) =>
  Float64Array.from({ length: Math.round(endS / dtS) + 1 }, (_, i) => pulse(i * dtS))
const NEWMARK_TABLE = [0, 0.0437, 0.2326, 0.6121, 1.0825, 1.431, 1.4231, 0.9622, 0.1908, -0.6044, -1.1442]
const EXACT_TABLE = [0, 0.0328, 0.2332, 0.6487, 1.1605, 1.5242, 1.4814, 0.9245, 0.0593, -0.7752, -1.2718]

/** Exact response to the half-sine pulse: Chopra eqs. 3.2.1–3.2.4 while it lasts, free vibration after. */
function exactPulseResponse(t: number): number {
  const forced = (s: number) => harmonicResponse(10 / m, Math.PI / 0.6, omega, zeta, s)
  if (t <= 0.6) return forced(t).u
  const end = forced(0.6)
  return freeVibration(end.u, end.v, omega, zeta, t - 0.6).u
}

describe('newmarkSdof (Chopra Table 5.4.2, fixed step)', () => {
  it('reproduces the textbook average-acceleration table at Δt = 0.1 s to its 4 decimals', () => {
    const { u } = newmarkSdof({
      mass: m,
      stiffness: k,
      dampingRatio: zeta,
      force: force(0.1),
      dtS: 0.1,
      gamma: 0.5,
      beta: 0.25,
    })
    NEWMARK_TABLE.forEach((expected, i) =>
      expect(Math.abs(u[i]! - expected)).toBeLessThanOrEqual(0.00005 + 1e-9),
    )
  })

  it('the closed-form solution reproduces the textbook exact row to its 4 decimals', () => {
    EXACT_TABLE.forEach((expected, i) =>
      expect(Math.abs(exactPulseResponse(i * 0.1) - expected)).toBeLessThanOrEqual(0.00005 + 1e-9),
    )
  })

  it('converges at second order: halving Δt divides the error at t = 1 s by about 4 (both Newmark variants)', () => {
    const exact = exactPulseResponse(1)
    for (const beta of [0.25, 1 / 6]) {
      const errors = [0.02, 0.01, 0.005].map((dtS) => {
        const { u } = newmarkSdof({
          mass: m,
          stiffness: k,
          dampingRatio: zeta,
          force: force(dtS),
          dtS,
          gamma: 0.5,
          beta,
        })
        return Math.abs(u[u.length - 1]! - exact)
      })
      expect(errors[0]! / errors[1]!).toBeGreaterThan(3.6)
      expect(errors[0]! / errors[1]!).toBeLessThan(4.4)
      expect(errors[1]! / errors[2]!).toBeGreaterThan(3.6)
      expect(errors[1]! / errors[2]!).toBeLessThan(4.4)
    }
  })

  it('average acceleration lengthens the period by T̄/T = x/arctan(x), x = πΔt/T (Newmark 1959; DOMAIN: 0.8%, 3.2%, 12%)', () => {
    for (const [ratio, expected] of [
      [0.05, 0.008],
      [0.1, 0.032],
      [0.2, 0.12],
    ] as const) {
      const T = 1
      const steps = Math.round(200 / ratio)
      const { u } = newmarkSdof({
        stiffness: (2 * Math.PI) ** 2,
        dampingRatio: 0,
        force: new Float64Array(steps),
        dtS: ratio * T,
        gamma: 0.5,
        beta: 0.25,
        u0: 1,
      })
      // Period from the first and last upward zero crossings, interpolated linearly.
      const crossings: number[] = []
      for (let i = 0; i + 1 < u.length; i++) {
        if (u[i]! < 0 && u[i + 1]! >= 0) crossings.push((i + u[i]! / (u[i]! - u[i + 1]!)) * ratio * T)
      }
      const measured = (crossings[crossings.length - 1]! - crossings[0]!) / (crossings.length - 1)
      const x = Math.PI * ratio
      expect(measured / (x / Math.atan(x))).toBeCloseTo(1, 4)
      expect(measured - 1).toBeCloseTo(expected, 2)
      // No amplitude decay at ζ = 0: energy u² + (v/ω)² is conserved by the average-acceleration rule.
      expect(Math.max(...u.map(Math.abs))).toBeLessThanOrEqual(1 + 1e-9)
    }
  })

  it('linear acceleration is stable up to Δt/T = √3/π and grows without bound beyond (Chopra sec. 5.4)', () => {
    const run = (ratio: number) =>
      newmarkSdof({
        stiffness: (2 * Math.PI) ** 2,
        dampingRatio: 0,
        force: new Float64Array(2000),
        dtS: ratio,
        gamma: 0.5,
        beta: 1 / 6,
        u0: 1,
      }).u
    expect(Math.max(...run(0.55).map(Math.abs))).toBeLessThan(2)
    expect(Math.max(...run(0.56).map(Math.abs))).toBeGreaterThan(100)
  })
})

describe('piecewiseExactSdof (Nigam & Jennings 1969; Chopra sec. 5.2)', () => {
  it('follows free vibration exactly (Chopra eq. 2.2.4)', () => {
    const dtS = 0.13
    const { u, v } = piecewiseExactSdof({
      mass: m,
      stiffness: k,
      dampingRatio: 0.12,
      force: new Float64Array(60),
      dtS,
      u0: 0.7,
      v0: -3,
    })
    for (let i = 0; i < 60; i += 7) {
      const exact = freeVibration(0.7, -3, omega, 0.12, i * dtS)
      expect(u[i]! - exact.u).toBeCloseTo(0, 12)
      expect(v[i]! - exact.v).toBeCloseTo(0, 11)
    }
  })

  it('is exact at the steps for a force linear between steps: a ramp (closed form u = (p/k)(t − sin ωt/ω)/t1 for ζ = 0)', () => {
    const t1 = 1
    const dtS = 0.25
    const ramp = Float64Array.from({ length: 9 }, (_, i) => (5 * i * dtS) / t1)
    const { u } = piecewiseExactSdof({ mass: m, stiffness: k, dampingRatio: 0, force: ramp, dtS })
    // Chopra eq. 4.4.2, ramp force p0·t/tr from rest on an undamped system.
    ramp.forEach((_, i) => {
      const t = i * dtS
      expect(u[i]! - (5 / k) * (t / t1 - Math.sin(omega * t) / (omega * t1))).toBeCloseTo(0, 12)
    })
  })

  it('converges to the textbook exact row as Δt shrinks, at second order for the sine pulse', () => {
    const errors = [0.02, 0.01].map((dtS) => {
      const { u } = piecewiseExactSdof({ mass: m, stiffness: k, dampingRatio: zeta, force: force(dtS), dtS })
      return Math.abs(u[u.length - 1]! - exactPulseResponse(1))
    })
    expect(errors[0]! / errors[1]!).toBeGreaterThan(3.6)
    expect(errors[0]! / errors[1]!).toBeLessThan(4.4)
    const { u } = piecewiseExactSdof({
      mass: m,
      stiffness: k,
      dampingRatio: zeta,
      force: force(0.001),
      dtS: 0.001,
    })
    EXACT_TABLE.forEach((expected, i) => expect(Math.abs(u[i * 100]! - expected)).toBeLessThanOrEqual(0.0001))
  })

  it('rejects inconsistent input', () => {
    expect(() => piecewiseExactSdof({ stiffness: 1, force: new Float64Array(3), dtS: 0.1 })).toThrow(
      RangeError,
    )
    expect(() => piecewiseExactSdof({ stiffness: 1, dampingRatio: 0.05, dtS: 0.1 })).toThrow(RangeError)
  })
})
