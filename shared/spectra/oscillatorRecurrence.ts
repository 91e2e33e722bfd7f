/**
 * One-step recurrences of the unit-mass oscillator under ground acceleration,
 *   u'' + 2ζω u' + ω² u = −a_g(t),
 * with a_g linear over the step h. For every method here the step is linear:
 *   [u, v]_{k+1} = [[a11, a12], [a21, a22]]·[u, v]_k + [b1, b2]·a_g,k + [c1, c2]·a_g,k+1
 * with coefficients fixed per oscillator and step, so one kernel serves all of them.
 */

export type SpectrumMethod = 'newmark-average' | 'newmark-linear' | 'piecewise-exact'

export const SPECTRUM_METHODS: readonly SpectrumMethod[] = [
  'newmark-average',
  'newmark-linear',
  'piecewise-exact',
]

/**
 * Newmark (1959, J. Eng. Mech. Div. ASCE 85(EM3)) parameters: average
 * acceleration (γ = 1/2, β = 1/4) is unconditionally stable; linear
 * acceleration (γ = 1/2, β = 1/6) is stable for h/T ≤ √3/π ≈ 0.551.
 */
export const NEWMARK_PARAMETERS = {
  'newmark-average': { gamma: 0.5, beta: 0.25 },
  'newmark-linear': { gamma: 0.5, beta: 1 / 6 },
} as const satisfies Record<Exclude<SpectrumMethod, 'piecewise-exact'>, { gamma: number; beta: number }>

/** Stability limit of linear-acceleration Newmark, h/T ≤ √3/π (Chopra, Dynamics of Structures, sec. 5.4). */
export const NEWMARK_LINEAR_STABILITY_LIMIT = Math.sqrt(3) / Math.PI

export interface RecurrenceCoefficients {
  a11: number
  a12: number
  b1: number
  c1: number
  a21: number
  a22: number
  b2: number
  c2: number
}

/**
 * One Newmark step of the unit-mass oscillator in its textbook form: predict
 * u and v from the start, solve equilibrium at the end for the acceleration,
 * correct. The starting acceleration comes from equilibrium at the start.
 */
function newmarkStep(
  omega: number,
  zeta: number,
  h: number,
  gamma: number,
  beta: number,
  u: number,
  v: number,
  ag0: number,
  ag1: number,
): [number, number] {
  const c = 2 * zeta * omega
  const k = omega * omega
  const acc0 = -ag0 - c * v - k * u
  const uPredicted = u + h * v + h * h * (0.5 - beta) * acc0
  const vPredicted = v + h * (1 - gamma) * acc0
  const acc1 = (-ag1 - c * vPredicted - k * uPredicted) / (1 + gamma * h * c + beta * h * h * k)
  return [uPredicted + beta * h * h * acc1, vPredicted + gamma * h * acc1]
}

/** Newmark-β coefficients, found by applying one step to each unit input (the step is linear). */
export function newmarkCoefficients(
  omega: number,
  zeta: number,
  h: number,
  gamma: number,
  beta: number,
): RecurrenceCoefficients {
  const [a11, a21] = newmarkStep(omega, zeta, h, gamma, beta, 1, 0, 0, 0)
  const [a12, a22] = newmarkStep(omega, zeta, h, gamma, beta, 0, 1, 0, 0)
  const [b1, b2] = newmarkStep(omega, zeta, h, gamma, beta, 0, 0, 1, 0)
  const [c1, c2] = newmarkStep(omega, zeta, h, gamma, beta, 0, 0, 0, 1)
  return { a11, a12, b1, c1, a21, a22, b2, c2 }
}

/**
 * Exact coefficients for a_g linear over the step (Nigam & Jennings 1969,
 * BSSA 59(2); Chopra, Dynamics of Structures, sec. 5.2), from the matrix
 * exponential of the state equation in the scaled state y = [ωu, v]:
 *   ẏ = ω[[0, 1], [−1, −2ζ]]·y + [0, −1]·a_g,  G = ωh[[0, 1], [−1, −2ζ]],
 *   y_{k+1} = e^G·y_k + h·Σ G^j/(j!(j+2))·g·a_g,k + h·Σ G^j/(j+2)!·g·a_g,k+1.
 * The series are summed directly for ωh ≤ 1, where the closed form loses
 * digits to cancellation (its terms grow as 1/(ωh)³); beyond that the closed
 * form of Chopra's Table 5.2.1 is used.
 */
export function piecewiseExactCoefficients(omega: number, zeta: number, h: number): RecurrenceCoefficients {
  const x = omega * h
  if (x > 1) return nigamJenningsClosedForm(omega, zeta, h)
  // G = x·[[0, 1], [−1, −2ζ]]; P_j = G^j/j!.
  const g11 = 0
  const g12 = x
  const g21 = -x
  const g22 = -2 * zeta * x
  let p11 = 1
  let p12 = 0
  let p21 = 0
  let p22 = 1
  let e11 = 1
  let e12 = 0
  let e21 = 0
  let e22 = 1
  let s12 = 0 // Σ P_j/(j+2), column 2 only is needed (g = [0, −1])
  let s22 = 0.5
  let q12 = 0 // Σ P_j/((j+1)(j+2))
  let q22 = 0.5
  for (let j = 1; j < 40; j++) {
    const n11 = (p11 * g11 + p12 * g21) / j
    const n12 = (p11 * g12 + p12 * g22) / j
    const n21 = (p21 * g11 + p22 * g21) / j
    const n22 = (p21 * g12 + p22 * g22) / j
    p11 = n11
    p12 = n12
    p21 = n21
    p22 = n22
    e11 += p11
    e12 += p12
    e21 += p21
    e22 += p22
    s12 += p12 / (j + 2)
    s22 += p22 / (j + 2)
    q12 += p12 / ((j + 1) * (j + 2))
    q22 += p22 / ((j + 1) * (j + 2))
    if (Math.abs(p11) + Math.abs(p12) + Math.abs(p21) + Math.abs(p22) < 1e-18) break
  }
  return {
    a11: e11,
    a12: e12 / omega,
    b1: (-h * s12) / omega,
    c1: (-h * q12) / omega,
    a21: omega * e21,
    a22: e22,
    b2: -h * s22,
    c2: -h * q22,
  }
}

/**
 * Chopra, Dynamics of Structures, Table 5.2.1 (after Nigam & Jennings 1969),
 * unit mass, p = −a_g. Accurate when ωh is not small.
 */
export function nigamJenningsClosedForm(omega: number, zeta: number, h: number): RecurrenceCoefficients {
  const k = omega * omega
  const root = Math.sqrt(1 - zeta * zeta)
  const omegaD = omega * root
  const decay = Math.exp(-zeta * omega * h)
  const sin = Math.sin(omegaD * h)
  const cos = Math.cos(omegaD * h)
  const r = zeta / root
  const A = decay * (r * sin + cos)
  const B = decay * (sin / omegaD)
  const C =
    (1 / k) *
    ((2 * zeta) / (omega * h) +
      decay * (((1 - 2 * zeta * zeta) / (omegaD * h) - r) * sin - (1 + (2 * zeta) / (omega * h)) * cos))
  const D =
    (1 / k) *
    (1 -
      (2 * zeta) / (omega * h) +
      decay * (((2 * zeta * zeta - 1) / (omegaD * h)) * sin + ((2 * zeta) / (omega * h)) * cos))
  const Ad = -decay * (omega / root) * sin
  const Bd = decay * (cos - r * sin)
  const Cd = (1 / k) * (-1 / h + decay * ((omega / root + zeta / (h * root)) * sin + (1 / h) * cos))
  const Dd = (1 / (k * h)) * (1 - decay * (r * sin + cos))
  return { a11: A, a12: B, b1: -C, c1: -D, a21: Ad, a22: Bd, b2: -Cd, c2: -Dd }
}

export function recurrenceCoefficients(
  method: SpectrumMethod,
  omega: number,
  zeta: number,
  h: number,
): RecurrenceCoefficients {
  if (method === 'piecewise-exact') return piecewiseExactCoefficients(omega, zeta, h)
  const { gamma, beta } = NEWMARK_PARAMETERS[method]
  return newmarkCoefficients(omega, zeta, h, gamma, beta)
}

/**
 * Relative error of the step's eigenvalue: |λ̃h − λh|/(ωh), where
 * λ = −ζω + iω√(1−ζ²) is exact and λ̃ = ln(μ)/h for the eigenvalue μ of
 * [[a11, a12], [a21, a22]] in the upper half plane. Its imaginary part is the
 * period error (for average-acceleration Newmark T̄/T = x/arctan x, x = πh/T)
 * and its real part the error in decay. Infinite when μ is real: the step no
 * longer oscillates.
 */
export function eigenvalueError(
  coefficients: RecurrenceCoefficients,
  omega: number,
  zeta: number,
  h: number,
): number {
  const { a11, a12, a21, a22 } = coefficients
  const trace = a11 + a22
  const discriminant = (a11 - a22) * (a11 - a22) + 4 * a12 * a21
  if (discriminant >= 0) return Infinity
  const det = a11 * a22 - a12 * a21
  const re = 0.5 * Math.log(det)
  const im = Math.atan2(Math.sqrt(-discriminant) / 2, trace / 2)
  const exactRe = -zeta * omega * h
  const exactIm = omega * h * Math.sqrt(1 - zeta * zeta)
  return Math.hypot(re - exactRe, im - exactIm) / (omega * h)
}
