import { describe, expect, it } from 'vitest'
import { exactStepExtremes, hermiteExtreme, stepBounds } from './betweenSteps.js'
import { mulberry32 } from './demo/demoRecords.js'
import { freeVibration } from './freeVibration.js'
import { preciseCandidate } from './kernel/sweepKernel.js'
import { piecewiseExactCoefficients } from './oscillatorRecurrence.js'

/**
 * The exact response inside a step with a_g = f0 + sτ, from (u0, v0): the particular solution of
 * the ramp plus free vibration (Chopra, Dynamics of Structures, eq. 2.2.4, via freeVibration.ts),
 * an evaluation independent of betweenSteps.ts.
 */
function exactAt(u0: number, v0: number, f0: number, s: number, omega: number, zeta: number, tau: number) {
  const k = omega * omega
  const c = 2 * zeta * omega
  const up0 = -(f0 - (c * s) / k) / k
  const vp = -s / k
  const free = freeVibration(u0 - up0, v0 - vp, omega, zeta, tau)
  const u = up0 + vp * tau + free.u
  const v = vp + free.v
  return { u, v, a: c * v + k * u }
}

interface RandomStep {
  u0: number
  v0: number
  f0: number
  f1: number
  stepS: number
  omega: number
  zeta: number
}

function randomSteps(seed: number, count: number): RandomStep[] {
  const random = mulberry32(seed)
  return Array.from({ length: count }, () => {
    const periodS = 10 ** (-2.5 + 3.5 * random())
    const omega = (2 * Math.PI) / periodS
    const k = omega * omega
    const scale = 1 / k
    return {
      u0: (random() - 0.5) * 4 * scale,
      v0: (random() - 0.5) * 4 * scale * omega,
      f0: 2 * (random() - 0.5),
      f1: 2 * (random() - 0.5),
      stepS: 10 ** (-3 + 1.7 * random()),
      omega,
      zeta: random() < 0.2 ? 0 : 0.5 * random() ** 2,
    }
  })
}

/** Dense samples of |u|, |v| and |A| over the step: 4000 per step, and at least 200 per period. */
function denseMax(step: RandomStep) {
  const s = (step.f1 - step.f0) / step.stepS
  const samples = Math.max(4000, Math.ceil((200 * step.stepS * step.omega) / (2 * Math.PI)))
  const max = { u: 0, v: 0, a: 0 }
  for (let i = 0; i <= samples; i++) {
    const x = exactAt(step.u0, step.v0, step.f0, s, step.omega, step.zeta, (i / samples) * step.stepS)
    max.u = Math.max(max.u, Math.abs(x.u))
    max.v = Math.max(max.v, Math.abs(x.v))
    max.a = Math.max(max.a, Math.abs(x.a))
  }
  return max
}

describe('peaks between steps', () => {
  const steps = randomSteps(2026, 400)

  it('the bound on each step holds against dense sampling of the closed form, on random states', () => {
    let tightest = Infinity
    for (const step of steps) {
      const s = (step.f1 - step.f0) / step.stepS
      const start = exactAt(step.u0, step.v0, step.f0, s, step.omega, step.zeta, 0)
      const end = exactAt(step.u0, step.v0, step.f0, s, step.omega, step.zeta, step.stepS)
      const ends = {
        u: Math.max(Math.abs(start.u), Math.abs(end.u)),
        v: Math.max(Math.abs(start.v), Math.abs(end.v)),
        a: Math.max(Math.abs(start.a), Math.abs(end.a)),
      }
      const bound = stepBounds(step, ends)
      const dense = denseMax(step)
      for (const key of ['u', 'v', 'a'] as const) {
        expect(dense[key]).toBeLessThanOrEqual(bound[key] * (1 + 1e-9))
        if (dense[key] > ends[key])
          tightest = Math.min(tightest, (bound[key] - ends[key]) / (dense[key] - ends[key]))
      }
      // The kernel's exact test lists the step whenever its interior rises above the running peaks.
      const omega = step.omega
      const k = omega * omega
      const c = 2 * step.zeta * omega
      const listed = preciseCandidate(
        step.u0,
        step.v0,
        step.f0,
        step.f1,
        1 / step.stepS,
        ends.u,
        ends.v,
        ends.a,
        Math.max(ends.u, dense.u * (1 - 1e-6)),
        Math.max(ends.v, dense.v * (1 - 1e-6)),
        Math.max(ends.a, dense.a * (1 - 1e-6)),
        omega,
        (1.01 * (omega * step.stepS) ** 2) / 8,
        step.zeta * omega,
        1 / (omega * Math.sqrt(1 - step.zeta ** 2)),
        1 / k,
        c / (k * k),
        k,
      )
      const risesInside =
        dense.u > ends.u * (1 + 1e-6) || dense.v > ends.v * (1 + 1e-6) || dense.a > ends.a * (1 + 1e-6)
      if (risesInside) expect(listed).toBe(true)
    }
    // The bound is not trivially loose: on some step it is within a factor 2 of the true rise.
    expect(tightest).toBeLessThan(2)
  })

  it('the closed-form search finds the interior extremes that dense sampling finds, with nothing under-read', () => {
    for (const step of steps) {
      const dense = denseMax(step)
      const found = exactStepExtremes(step)
      const s = (step.f1 - step.f0) / step.stepS
      const start = exactAt(step.u0, step.v0, step.f0, s, step.omega, step.zeta, 0)
      const end = exactAt(step.u0, step.v0, step.f0, s, step.omega, step.zeta, step.stepS)
      for (const key of ['u', 'v', 'a'] as const) {
        const searched = Math.max(Math.abs(start[key]), Math.abs(end[key]), found[key].value)
        // Dense samples can only under-read, by at most (2π/200)²/8 ≈ 1.2e-4 at 200 per period; the search may not.
        expect(searched).toBeGreaterThanOrEqual(dense[key] * (1 - 1e-9))
        expect(searched).toBeLessThanOrEqual(dense[key] * (1 + 1.3e-4))
      }
    }
  })

  it('the end state of the closed form is the piecewise-exact recurrence (Nigam & Jennings 1969)', () => {
    for (const step of steps.slice(0, 50)) {
      const c = piecewiseExactCoefficients(step.omega, step.zeta, step.stepS)
      const u1 = c.a11 * step.u0 + c.a12 * step.v0 + c.b1 * step.f0 + c.c1 * step.f1
      const end = exactAt(
        step.u0,
        step.v0,
        step.f0,
        (step.f1 - step.f0) / step.stepS,
        step.omega,
        step.zeta,
        step.stepS,
      )
      expect(Math.abs(u1 - end.u)).toBeLessThanOrEqual(
        1e-8 * (Math.abs(end.u) + Math.abs(step.u0) + 1 / step.omega ** 2),
      )
    }
  })

  it('the Hermite cubic through a sine peak reads it to (ωh)⁴/384 (Hermite interpolation error)', () => {
    // sin over [π/2 − 0.3, π/2 + 0.2], peak 1 at τ = 0.3 (closed form); |sin⁗| ≤ 1.
    const h = 0.5
    const t0 = Math.PI / 2 - 0.3
    const extreme = hermiteExtreme(Math.sin(t0), Math.cos(t0), Math.sin(t0 + h), Math.cos(t0 + h), h)
    expect(Math.abs(extreme.value - 1)).toBeLessThanOrEqual(h ** 4 / 384)
    expect(Math.abs(extreme.tauS - 0.3)).toBeLessThan(0.01)
    // A monotonic step has no interior extreme.
    expect(hermiteExtreme(0, 1, 1, 1, 1).value).toBe(0)
  })
})
