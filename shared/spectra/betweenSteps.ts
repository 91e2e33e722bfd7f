/**
 * Peaks between steps, for the unit-mass oscillator u'' + 2ζωu' + ω²u = −a_g(t) with a_g
 * linear over a step of length h, a_g(τ) = f₀ + sτ (s = (f₁ − f₀)/h), 0 ≤ ζ < 1.
 *
 * Within the step the exact response is a straight line plus a damped sinusoid:
 *   u(τ) = u_p(τ) + g(τ),  u_p = −(f₀ − c·s/k)/k − (s/k)τ,  c = 2ζω, k = ω²,
 *   g(τ) = e^(−στ)(P cos ω_Dτ + Q sin ω_Dτ),  σ = ζω, ω_D = ω√(1−ζ²),
 *   P = u₀ − u_p(0),  Q = (v₀ + s/k + σP)/ω_D.
 * Every derivative of g is a damped sinusoid of the same kind whose amplitude √(P² + Q²) is
 * ω times the last one's (σ² + ω_D² = ω²), and |g(τ)| ≤ W = √(P² + Q²) for τ ≥ 0. So, with
 * v = u' = −s/k + g' and the absolute acceleration −A, A = cv + ku = −a_g + H, H = −g'':
 * - |u''| ≤ ω²W, |v''| ≤ ω³W, |A''| ≤ ω⁴W, and a function f with |f''| ≤ M on the step
 *   rises at most M·h²/8 above the larger of its end values (f ≤ linear interpolant +
 *   M·τ(h − τ)/2): max|u| ≤ max(|u₀|, |u₁|) + (ωh)²/8·W, and so on with W_v = ωW, W_A = ω²W;
 * - also max|u| ≤ max|u_p| + W, max|v| ≤ |s|/k + ωW, max|A| ≤ max(|f₀|, |f₁|) + ω²W,
 *   the tighter one when the period is shorter than the step.
 * The kernel (kernel/sweepKernel.ts) lists the steps where either bound does not rule out a
 * new peak; the rest of the step cannot hold one. This module then finds the extremes there:
 * - piecewise-exact recurrence: from the closed form above. Interior extremes of
 *   F = L + g (L linear: u, v or A) are roots of F' = L' + g'. F'' = g'' is a damped
 *   sinusoid whose zeros are half a damped period apart, so between them F' is monotonic and
 *   holds at most one root: each such piece is bracketed and its root found by safeguarded
 *   Newton iteration, however many periods the step holds.
 * - Newmark-β: from cubic Hermite interpolants of the step's end values and slopes,
 *   (u, u') for SD, (v, v') for SV, (A, A') for SA. The interpolant of a function with
 *   |f''''| ≤ M₄ is within M₄h⁴/384 of it (Burden & Faires, Numerical Analysis, Hermite
 *   interpolation error; from memory), so with the bounds above SD is read within
 *   (ωh)⁴/384·W, SV within (ωh)⁴/384·ωW and SA within (ωh)⁴/384·ω²W of the extremes of the
 *   exact solution through the same end states.
 */
import { CANDIDATE_VALUES } from './kernel/sweepKernel.js'
import { type RecurrenceCoefficients, type SpectrumMethod } from './oscillatorRecurrence.js'

/** Safety raise on the kernel's margin: covers rounding and, for Newmark, the end states' own error. */
export const MARGIN_RAISE = 1.01

/** The record's PGA and steepest slope, which bound the particular solution over the record. */
export interface ForcingBounds {
  pgaMPerS2: number
  maxSlopeMPerS3: number
}

/**
 * The 18 kernel coefficients of one oscillator (layout in kernel/sweepKernel.ts): the
 * recurrence, cc = 2ζω, kk = ω², then ω, q = 1.01·(ωh)²/8, σ, 1/ω_D, 1/k, c/k² and the
 * bounds up = (PGA + c·J/k)/k ≥ |u_p|, vp = J/k ≥ |v_p| over the record.
 */
export function kernelCoefficients(
  coefficients: RecurrenceCoefficients,
  omega: number,
  zeta: number,
  stepS: number,
  bounds: ForcingBounds,
): number[] {
  const k = omega * omega
  const c = 2 * zeta * omega
  const omegaD = omega * Math.sqrt(1 - zeta * zeta)
  const x = omega * stepS
  const { a11, a12, b1, c1, a21, a22, b2, c2 } = coefficients
  return [
    a11,
    a12,
    b1,
    c1,
    a21,
    a22,
    b2,
    c2,
    c,
    k,
    omega,
    (MARGIN_RAISE * x * x) / 8,
    zeta * omega,
    1 / omegaD,
    1 / k,
    c / (k * k),
    (bounds.pgaMPerS2 + (c * bounds.maxSlopeMPerS3) / k) / k,
    bounds.maxSlopeMPerS3 / k,
  ]
}

export interface StepState {
  u0: number
  v0: number
  /** Ground acceleration at the start and end of the step. */
  f0: number
  f1: number
  stepS: number
  omega: number
  zeta: number
}

/**
 * W = √(P² + Q²), the amplitude of the step's damped sinusoid (see above), from the start state
 * and the forcing f0 + sτ; k = ω², c = 2ζω.
 */
function sinusoidAmplitude(
  u0: number,
  v0: number,
  f0: number,
  s: number,
  omega: number,
  zeta: number,
): number {
  const k = omega * omega
  const c = 2 * zeta * omega
  const p = u0 + f0 / k - (c * s) / (k * k)
  const r = (v0 + s / k + zeta * omega * p) / (omega * Math.sqrt(1 - zeta * zeta))
  return Math.sqrt(p * p + r * r)
}

/** Bounds on max|u|, max|v| and max|A|, or the larger end values they start from. */
export interface StepMaxima {
  u: number
  v: number
  a: number
}

/**
 * Upper bounds on max|u|, max|v| and max|A| inside a step, given the larger end values (see
 * above), written into `out` so the hot path allocates nothing.
 */
function stepBoundsInto(out: StepMaxima, state: StepState, ends: StepMaxima): StepMaxima {
  const { u0, v0, f0, f1, stepS, omega, zeta } = state
  const s = (f1 - f0) / stepS
  const w = sinusoidAmplitude(u0, v0, f0, s, omega, zeta)
  const fm = Math.max(Math.abs(f0), Math.abs(f1))
  const as = Math.abs(s)
  const k = omega * omega
  const c = 2 * zeta * omega
  const q = ((omega * stepS) ** 2 / 8) * MARGIN_RAISE
  out.u = Math.min(ends.u + q * w, fm / k + (c * as) / (k * k) + w)
  out.v = Math.min(ends.v + q * omega * w, as / k + omega * w)
  out.a = Math.min(ends.a + q * k * w, fm + k * w)
  return out
}

/** Upper bounds on max|u|, max|v| and max|A| inside a step, given the larger end values (see above). */
export function stepBounds(state: StepState, ends: StepMaxima): StepMaxima {
  return stepBoundsInto({ u: 0, v: 0, a: 0 }, state, ends)
}

/** Which of u, v and A a step's search is wanted for (all, unless a bound rules some out). */
export interface Wanted {
  u: boolean
  v: boolean
  a: boolean
}

const ALL: Wanted = { u: true, v: true, a: true }

export interface Extreme {
  value: number
  /** Time from the start of the step. */
  tauS: number
}

const NONE: Extreme = { value: 0, tauS: 0 }

/** e^(−στ)(a cos ω_Dτ + b sin ω_Dτ). Plain functions, not closures, keep the hot path free of allocation. */
function dampedSine(tau: number, a: number, b: number, sigma: number, omegaD: number): number {
  return Math.exp(-sigma * tau) * (a * Math.cos(omegaD * tau) + b * Math.sin(omegaD * tau))
}

/**
 * Root of the monotonic slope F'(τ) = l1 + g'(τ) on [lo, hi], where it changes sign, by Newton
 * steps (F'' = g'') kept inside the bracket.
 */
function slopeRoot(
  l1: number,
  p1: number,
  q1: number,
  p2: number,
  q2: number,
  sigma: number,
  omegaD: number,
  lo: number,
  hi: number,
  fLo: number,
): number {
  let a = lo
  let b = hi
  const rising = fLo < 0
  let x = 0.5 * (a + b)
  for (let i = 0; i < 60; i++) {
    const fx = l1 + dampedSine(x, p1, q1, sigma, omegaD)
    if (fx === 0) return x
    if (fx < 0 === rising) a = x
    else b = x
    const d = dampedSine(x, p2, q2, sigma, omegaD)
    let next = d !== 0 ? x - fx / d : 0.5 * (a + b)
    if (!(next > a && next < b)) next = 0.5 * (a + b)
    if (Math.abs(next - x) <= 1e-14 * (b - lo + lo)) return next
    x = next
  }
  return x
}

/**
 * Largest |F| at interior critical points of F(τ) = l0 + l1·τ + g(τ) on (0, h), g the damped
 * sinusoid (p, q): pieces between zeros of g'' (half a damped period apart) hold at most one
 * root of F' each.
 */
function interiorExtreme(
  l0: number,
  l1: number,
  p: number,
  q: number,
  sigma: number,
  omegaD: number,
  h: number,
): Extreme {
  const p1 = -sigma * p + omegaD * q
  const q1 = -sigma * q - omegaD * p
  const p2 = -sigma * p1 + omegaD * q1
  const q2 = -sigma * q1 - omegaD * p1
  if (p2 === 0 && q2 === 0) return NONE
  let theta = Math.atan2(-p2, q2)
  if (theta < 0) theta += Math.PI
  const half = Math.PI / omegaD
  let bestValue = 0
  let bestTau = 0
  let lo = 0
  let slopeLo = l1 + p1
  for (let zero = theta / omegaD; lo < h; zero += half) {
    const hi = Math.min(zero, h)
    if (hi <= lo) continue
    const slopeHi = l1 + dampedSine(hi, p1, q1, sigma, omegaD)
    if ((slopeLo <= 0 && slopeHi >= 0) || (slopeLo >= 0 && slopeHi <= 0)) {
      const tau = slopeRoot(l1, p1, q1, p2, q2, sigma, omegaD, lo, hi, slopeLo)
      if (tau > 0 && tau < h) {
        const value = Math.abs(l0 + l1 * tau + dampedSine(tau, p, q, sigma, omegaD))
        if (value > bestValue) {
          bestValue = value
          bestTau = tau
        }
      }
    }
    lo = hi
    slopeLo = slopeHi
  }
  return bestValue > 0 ? { value: bestValue, tauS: bestTau } : NONE
}

/**
 * Interior extremes of |u|, |v| and |A| in one step of the exact solution (closed form above);
 * a quantity not wanted answers NONE without a search.
 */
export function exactStepExtremes(
  state: StepState,
  wanted: Wanted = ALL,
): { u: Extreme; v: Extreme; a: Extreme } {
  const { u0, v0, f0, f1, stepS: h, omega, zeta } = state
  const k = omega * omega
  const c = 2 * zeta * omega
  const sigma = zeta * omega
  const omegaD = omega * Math.sqrt(1 - zeta * zeta)
  const s = (f1 - f0) / h
  const up0 = -(f0 - (c * s) / k) / k
  const p = u0 - up0
  const q = (v0 + s / k + sigma * p) / omegaD
  const p1 = -sigma * p + omegaD * q
  const q1 = -sigma * q - omegaD * p
  const p2 = -sigma * p1 + omegaD * q1
  const q2 = -sigma * q1 - omegaD * p1
  return {
    u: wanted.u ? interiorExtreme(up0, -s / k, p, q, sigma, omegaD, h) : NONE,
    v: wanted.v ? interiorExtreme(-s / k, 0, p1, q1, sigma, omegaD, h) : NONE,
    a: wanted.a ? interiorExtreme(-f0, -s, -p2, -q2, sigma, omegaD, h) : NONE,
  }
}

/**
 * Largest |H| at interior critical points of the cubic Hermite interpolant on [0, h] with end
 * values x0, x1 and slopes d0, d1: H'(t) = αt² + βt + γ in t = τ/h.
 */
export function hermiteExtreme(x0: number, d0: number, x1: number, d1: number, h: number): Extreme {
  const m0 = h * d0
  const m1 = h * d1
  const alpha = 6 * x0 + 3 * m0 - 6 * x1 + 3 * m1
  const beta = -6 * x0 - 4 * m0 + 6 * x1 - 2 * m1
  const gamma = m0
  // Up to two roots of H' in t; NaN stands for none.
  let first = NaN
  let second = NaN
  if (Math.abs(alpha) <= 1e-14 * (Math.abs(beta) + Math.abs(gamma))) {
    if (beta !== 0) first = -gamma / beta
  } else {
    const disc = beta * beta - 4 * alpha * gamma
    if (disc >= 0) {
      const root = -0.5 * (beta + Math.sign(beta || 1) * Math.sqrt(disc))
      if (root !== 0) {
        first = root / alpha
        second = gamma / root
      }
    }
  }
  const atFirst = first > 0 && first < 1 ? hermiteValue(x0, m0, x1, m1, first) : 0
  const atSecond = second > 0 && second < 1 ? hermiteValue(x0, m0, x1, m1, second) : 0
  if (atFirst === 0 && atSecond === 0) return NONE
  return atSecond > atFirst ? { value: atSecond, tauS: second * h } : { value: atFirst, tauS: first * h }
}

/** |H(t)| of the cubic Hermite interpolant with end values x0, x1 and scaled slopes m0, m1. */
function hermiteValue(x0: number, m0: number, x1: number, m1: number, t: number): number {
  const t2 = t * t
  const t3 = t2 * t
  return Math.abs(
    x0 * (2 * t3 - 3 * t2 + 1) + m0 * (t3 - 2 * t2 + t) + x1 * (-2 * t3 + 3 * t2) + m1 * (t3 - t2),
  )
}

/**
 * Interior extremes of the Newmark step from (u0, v0) to (u1, v1), read from Hermite
 * interpolants; a quantity not wanted answers NONE without a search.
 */
export function hermiteStepExtremes(
  state: StepState,
  u1: number,
  v1: number,
  wanted: Wanted = ALL,
): { u: Extreme; v: Extreme; a: Extreme } {
  const { u0, v0, f0, f1, stepS: h, omega, zeta } = state
  const k = omega * omega
  const c = 2 * zeta * omega
  const a0 = c * v0 + k * u0
  const a1 = c * v1 + k * u1
  const r0 = -f0 - a0
  const r1 = -f1 - a1
  return {
    u: wanted.u ? hermiteExtreme(u0, v0, u1, v1, h) : NONE,
    v: wanted.v ? hermiteExtreme(v0, r0, v1, r1, h) : NONE,
    a: wanted.a ? hermiteExtreme(a0, c * r0 + k * v0, a1, c * r1 + k * v1, h) : NONE,
  }
}

/** Peaks of one oscillator, raised in place by what lies between steps. */
export interface MutablePeaks {
  sd: number
  sdTimeS: number
  sv: number
  sa: number
  saTimeS: number
}

export interface CandidateOscillator {
  method: SpectrumMethod
  coefficients: RecurrenceCoefficients
  omega: number
  zeta: number
}

/** Raises SD (with its time) when an interior extreme beats it; an equal value keeps the earlier time. */
function raiseSd(target: MutablePeaks, value: number, timeS: number): void {
  if (value > target.sd || (value === target.sd && timeS < target.sdTimeS)) {
    target.sd = value
    target.sdTimeS = timeS
  }
}

/** Raises SA (with its time) when an interior extreme beats it; an equal value keeps the earlier time. */
function raiseSa(target: MutablePeaks, value: number, timeS: number): void {
  if (value > target.sa || (value === target.sa && timeS < target.saTimeS)) {
    target.sa = value
    target.saTimeS = timeS
  }
}

/**
 * Resolves the kernel's candidate steps for a call: for each listed step, the interior
 * extremes (closed form or Hermite, by method) raise that oscillator's peaks. `values` holds
 * `found` entries (oscillator slot, step, u₀, v₀); the steps are re-derived from the record
 * exactly as the kernels interpolate it. A slot whose `peaks` entry is null (peaks read at step
 * ends, or padding) is skipped. The result does not depend on the order of entries.
 */
export function raisePeaksBetweenSteps(
  record: Float64Array,
  subSteps: number,
  stepS: number,
  values: Float64Array,
  found: number,
  oscillators: readonly CandidateOscillator[],
  peaks: readonly (MutablePeaks | null)[],
): void {
  const m = subSteps
  const h = stepS
  // One state, one set of end values and bounds, one wanted set, reused for every listed step:
  // most listed steps are ruled out by the bounds, and the loop then allocates nothing.
  const state: StepState = { u0: 0, v0: 0, f0: 0, f1: 0, stepS: h, omega: 0, zeta: 0 }
  const ends: StepMaxima = { u: 0, v: 0, a: 0 }
  const bound: StepMaxima = { u: 0, v: 0, a: 0 }
  const wanted: Wanted = { u: false, v: false, a: false }
  for (let e = 0; e < found; e++) {
    const at = CANDIDATE_VALUES * e
    const slot = values[at]! | 0
    const target = peaks[slot]
    if (!target) continue
    const step = values[at + 1]!
    const u0 = values[at + 2]!
    const v0 = values[at + 3]!
    const index = Math.floor((step - 1) / m)
    const j = step - 1 - index * m
    const start = record[index]!
    const end = record[index + 1]!
    const slope = (end - start) / m
    const f0 = j === 0 ? start : start + slope * j
    const f1 = j + 1 === m ? end : start + slope * (j + 1)
    const oscillator = oscillators[slot]!
    const { omega, zeta } = oscillator
    const { a11, a12, b1, c1, a21, a22, b2, c2 } = oscillator.coefficients
    const u1 = a11 * u0 + a12 * v0 + b1 * f0 + c1 * f1
    const v1 = a21 * u0 + a22 * v0 + b2 * f0 + c2 * f1
    const c = 2 * zeta * omega
    const k = omega * omega
    state.u0 = u0
    state.v0 = v0
    state.f0 = f0
    state.f1 = f1
    state.omega = omega
    state.zeta = zeta
    // The kernel listed the step against the running peaks; the same bounds held against the
    // peaks of the whole record, per quantity, leave out what cannot beat them.
    ends.u = Math.max(Math.abs(u0), Math.abs(u1))
    ends.v = Math.max(Math.abs(v0), Math.abs(v1))
    ends.a = Math.max(Math.abs(c * v0 + k * u0), Math.abs(c * v1 + k * u1))
    stepBoundsInto(bound, state, ends)
    wanted.u = bound.u >= target.sd
    wanted.v = bound.v >= target.sv
    wanted.a = bound.a >= target.sa
    if (!(wanted.u || wanted.v || wanted.a)) continue
    const startS = (step - 1) * h
    const extremes =
      oscillator.method === 'piecewise-exact'
        ? exactStepExtremes(state, wanted)
        : hermiteStepExtremes(state, u1, v1, wanted)
    raiseSd(target, extremes.u.value, startS + extremes.u.tauS)
    if (extremes.v.value > target.sv) target.sv = extremes.v.value
    raiseSa(target, extremes.a.value, startS + extremes.a.tauS)
  }
}
