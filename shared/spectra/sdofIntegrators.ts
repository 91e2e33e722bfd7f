/**
 * Fixed-step single-oscillator integrators, with no sub-steps, for checking
 * textbook tables step by step:
 *   m·ü + c·u̇ + k·u = p(t),  or with ground acceleration p = −m·a_g(t).
 * Any consistent units (kip, in, s in the textbook example; kg, m, s elsewhere).
 * The spectrum sweep does not use these; it runs the same recurrences
 * (oscillatorRecurrence.ts) with sub-steps chosen for accuracy.
 */
import { piecewiseExactCoefficients } from './oscillatorRecurrence.js'

export interface SdofInput {
  /** Mass; 1 by default. */
  mass?: number
  stiffness: number
  /** Give either the damping ratio ζ or the damping coefficient c. */
  dampingRatio?: number
  damping?: number
  /** External force p at each step; or give groundAccel. */
  force?: Float64Array
  /** Ground acceleration a_g at each step (p = −m·a_g). */
  groundAccel?: Float64Array
  dtS: number
  u0?: number
  v0?: number
}

export interface NewmarkSdofInput extends SdofInput {
  gamma: number
  beta: number
}

/** Relative displacement, velocity and acceleration at each step. */
export interface SdofHistory {
  u: Float64Array
  v: Float64Array
  a: Float64Array
}

interface Resolved {
  m: number
  k: number
  c: number
  p: Float64Array
  dt: number
  u0: number
  v0: number
}

function resolve(input: SdofInput): Resolved {
  const m = input.mass ?? 1
  const k = input.stiffness
  if (!(m > 0 && k > 0)) throw new RangeError('mass and stiffness must be positive')
  if (!(input.dtS > 0)) throw new RangeError('dtS must be positive')
  if ((input.dampingRatio === undefined) === (input.damping === undefined)) {
    throw new RangeError('give exactly one of dampingRatio and damping')
  }
  const c = input.damping ?? 2 * input.dampingRatio! * Math.sqrt(k * m)
  if (!(c >= 0)) throw new RangeError('damping must not be negative')
  if ((input.force === undefined) === (input.groundAccel === undefined)) {
    throw new RangeError('give exactly one of force and groundAccel')
  }
  const p = input.force ?? input.groundAccel!.map((ag) => -m * ag)
  return { m, k, c, p, dt: input.dtS, u0: input.u0 ?? 0, v0: input.v0 ?? 0 }
}

/** Empty histories, one value per step, starting from (u0, v0). */
function startHistory(n: number, u0: number, v0: number): SdofHistory {
  const history = { u: new Float64Array(n), v: new Float64Array(n), a: new Float64Array(n) }
  history.u[0] = u0
  history.v[0] = v0
  return history
}

/**
 * Newmark-β in the incremental form of Chopra, Dynamics of Structures,
 * Table 5.4.2 (linear systems): γ = 1/2, β = 1/4 is average acceleration
 * (unconditionally stable), γ = 1/2, β = 1/6 linear acceleration (stable for
 * Δt/Tn ≤ √3/π). Second-order accurate; lengthens the period.
 */
export function newmarkSdof(input: NewmarkSdofInput): SdofHistory {
  const { m, k, c, p, dt, u0, v0 } = resolve(input)
  const { gamma, beta } = input
  if (!(beta > 0 && gamma >= 0)) throw new RangeError('Newmark needs β > 0 and γ ≥ 0')
  const n = p.length
  const { u, v, a } = startHistory(n, u0, v0)
  a[0] = (p[0]! - c * v0 - k * u0) / m
  const kHat = k + (gamma / (beta * dt)) * c + m / (beta * dt * dt)
  const A = m / (beta * dt) + (gamma / beta) * c
  const B = m / (2 * beta) + dt * (gamma / (2 * beta) - 1) * c
  for (let i = 0; i + 1 < n; i++) {
    const dpHat = p[i + 1]! - p[i]! + A * v[i]! + B * a[i]!
    const du = dpHat / kHat
    const dv = (gamma / (beta * dt)) * du - (gamma / beta) * v[i]! + dt * (1 - gamma / (2 * beta)) * a[i]!
    const da = du / (beta * dt * dt) - v[i]! / (beta * dt) - a[i]! / (2 * beta)
    u[i + 1] = u[i]! + du
    v[i + 1] = v[i]! + dv
    a[i + 1] = a[i]! + da
  }
  return { u, v, a }
}

/**
 * The piecewise-exact recurrence (Nigam & Jennings 1969; Chopra sec. 5.2):
 * exact at every step for a force linear between steps. Needs 0 ≤ ζ < 1.
 */
export function piecewiseExactSdof(input: SdofInput): SdofHistory {
  const { m, k, c, p, dt, u0, v0 } = resolve(input)
  const omega = Math.sqrt(k / m)
  const zeta = c / (2 * m * omega)
  if (!(zeta < 1)) throw new RangeError('the piecewise-exact recurrence needs an underdamped system (ζ < 1)')
  const { a11, a12, b1, c1, a21, a22, b2, c2 } = piecewiseExactCoefficients(omega, zeta, dt)
  const n = p.length
  const { u, v, a } = startHistory(n, u0, v0)
  // The unit-mass recurrence is driven by −a_g = p/m.
  for (let i = 0; i + 1 < n; i++) {
    const f0 = -p[i]! / m
    const f1 = -p[i + 1]! / m
    u[i + 1] = a11 * u[i]! + a12 * v[i]! + b1 * f0 + c1 * f1
    v[i + 1] = a21 * u[i]! + a22 * v[i]! + b2 * f0 + c2 * f1
  }
  for (let i = 0; i < n; i++) a[i] = (p[i]! - c * v[i]! - k * u[i]!) / m
  return { u, v, a }
}
