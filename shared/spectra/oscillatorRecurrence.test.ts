import { describe, expect, it } from 'vitest'
import { freeVibration } from './freeVibration.js'
import {
  type RecurrenceCoefficients,
  eigenvalueError,
  newmarkCoefficients,
  nigamJenningsClosedForm,
  piecewiseExactCoefficients,
} from './oscillatorRecurrence.js'
import { newmarkSdof } from './sdofIntegrators.js'

function step(c: RecurrenceCoefficients, u: number, v: number, f0: number, f1: number): [number, number] {
  return [c.a11 * u + c.a12 * v + c.b1 * f0 + c.c1 * f1, c.a21 * u + c.a22 * v + c.b2 * f0 + c.c2 * f1]
}

/**
 * Exact state after one step from (u0, v0) under ground acceleration a0 + s·t:
 * particular solution u_p = −(a − c·s/k)/k, v_p = −s/k (c = 2ζω, k = ω²) plus free
 * vibration (Chopra eq. 2.2.4) of the difference — independent of either recurrence.
 */
function exactStep(
  omega: number,
  zeta: number,
  h: number,
  u0: number,
  v0: number,
  a0: number,
  a1: number,
): [number, number] {
  const k = omega * omega
  const c = 2 * zeta * omega
  const s = (a1 - a0) / h
  const up = (a: number) => -(a - (c * s) / k) / k
  const vp = -s / k
  const free = freeVibration(u0 - up(a0), v0 - vp, omega, zeta, h)
  return [free.u + up(a1), free.v + vp]
}

describe('piecewise-exact coefficients', () => {
  const cases = [0, 0.02, 0.05, 0.3, 0.49].flatMap((zeta) =>
    [1e-4, 0.01, 0.1, 0.5, 1, 2.5].map((x) => ({ zeta, x })),
  )

  it('match the exact one-step solution for forcing linear over the step, from small to large ωh', () => {
    for (const { zeta, x } of cases) {
      const omega = 2 * Math.PI
      const h = x / omega
      const c = piecewiseExactCoefficients(omega, zeta, h)
      const [u, v] = step(c, 0.3, -0.8, 1.7, -0.4)
      const [ue, ve] = exactStep(omega, zeta, h, 0.3, -0.8, 1.7, -0.4)
      // Relative to the state's scale; the closed-form check itself cancels digits at tiny ωh.
      const scale = Math.max(Math.abs(ue), 1e-3)
      expect(Math.abs(u - ue) / scale).toBeLessThan(x < 0.01 ? 1e-6 : 1e-12)
      expect(Math.abs(v - ve) / Math.max(Math.abs(ve), 1e-3)).toBeLessThan(x < 0.01 ? 1e-6 : 1e-12)
    }
  })

  it('the series (matrix exponential) and the closed form of Chopra Table 5.2.1 agree where both are accurate', () => {
    for (const zeta of [0, 0.05, 0.3]) {
      for (const x of [0.3, 0.6, 1]) {
        const omega = 7
        const series = piecewiseExactCoefficients(omega, zeta, x / omega - 1e-15)
        const closed = nigamJenningsClosedForm(omega, zeta, x / omega - 1e-15)
        for (const key of Object.keys(series) as (keyof RecurrenceCoefficients)[]) {
          expect(Math.abs(series[key] - closed[key])).toBeLessThan(1e-12 * (Math.abs(closed[key]) + 1e-3))
        }
      }
    }
  })

  it('have no eigenvalue error: the period and decay are exact', () => {
    for (const { zeta, x } of cases.filter((entry) => entry.x >= 0.01)) {
      const omega = 3
      expect(
        eigenvalueError(piecewiseExactCoefficients(omega, zeta, x / omega), omega, zeta, x / omega),
      ).toBeLessThan(1e-11)
    }
  })
})

describe('Newmark coefficients', () => {
  it('reproduce the textbook incremental form (Chopra Table 5.4.2) step by step', () => {
    const omega = 2 * Math.PI
    const dtS = 0.02
    const ag = Float64Array.from({ length: 200 }, (_, i) => Math.sin(0.3 * i) + 0.2 * Math.cos(1.1 * i))
    for (const beta of [0.25, 1 / 6]) {
      const textbook = newmarkSdof({
        stiffness: omega * omega,
        dampingRatio: 0.07,
        groundAccel: ag,
        dtS,
        gamma: 0.5,
        beta,
      })
      const c = newmarkCoefficients(omega, 0.07, dtS, 0.5, beta)
      let u = 0
      let v = 0
      for (let i = 0; i + 1 < ag.length; i++) {
        ;[u, v] = step(c, u, v, ag[i]!, ag[i + 1]!)
        expect(u - textbook.u[i + 1]!).toBeCloseTo(0, 12)
        expect(v - textbook.v[i + 1]!).toBeCloseTo(0, 11)
      }
    }
  })

  it('average acceleration has the period error of x/arctan(x), x = πh/T, and no decay error at ζ = 0 (Newmark 1959)', () => {
    for (const ratio of [0.01, 0.05, 0.1, 0.2]) {
      const omega = 2 * Math.PI
      const h = ratio
      const c = newmarkCoefficients(omega, 0, h, 0.5, 0.25)
      // Discrete phase per step is 2·arctan(ωh/2); exact is ωh.
      expect(eigenvalueError(c, omega, 0, h)).toBeCloseTo(
        (omega * h - 2 * Math.atan((omega * h) / 2)) / (omega * h),
        12,
      )
    }
  })

  it('linear acceleration stops oscillating (real eigenvalues) beyond its stability limit h/T = √3/π', () => {
    const omega = 2 * Math.PI
    expect(eigenvalueError(newmarkCoefficients(omega, 0, 0.5, 0.5, 1 / 6), omega, 0, 0.5)).toBeLessThan(0.5)
    expect(eigenvalueError(newmarkCoefficients(omega, 0, 0.6, 0.5, 1 / 6), omega, 0, 0.6)).toBe(Infinity)
  })
})
