/**
 * Damped free vibration of the unit-mass oscillator (0 ≤ ζ < 1), in closed form
 * (Chopra, Dynamics of Structures, eq. 2.2.4):
 *   u(t) = e^(−ζωt)·[u₀ cos ω_D t + ((v₀ + ζωu₀)/ω_D) sin ω_D t],  ω_D = ω√(1−ζ²).
 */
export function freeVibration(
  u0: number,
  v0: number,
  omega: number,
  zeta: number,
  tS: number,
): { u: number; v: number } {
  const sigma = zeta * omega
  const omegaD = omega * Math.sqrt(1 - zeta * zeta)
  const decay = Math.exp(-sigma * tS)
  const cos = Math.cos(omegaD * tS)
  const sin = Math.sin(omegaD * tS)
  return {
    u: decay * (u0 * cos + ((v0 + sigma * u0) / omegaD) * sin),
    v: decay * (v0 * cos - ((omega * omega * u0 + sigma * v0) / omegaD) * sin),
  }
}

/**
 * The first extremum after t = 0 of f(t) = e^(−σt)·(P cos ω_D t + Q sin ω_D t),
 * where f'(t) = 0, i.e. (ω_D·Q − σP)·cos θ = (σQ + ω_D·P)·sin θ, θ = ω_D·t in (0, π].
 * Later extrema are smaller by e^(−σπ/ω_D) each (equal when σ = 0), so this is
 * the largest |f| over all t > 0 that is not at t = 0 itself.
 */
export function firstExtremum(
  P: number,
  Q: number,
  sigma: number,
  omegaD: number,
): { value: number; timeS: number } {
  const alpha = omegaD * Q - sigma * P
  const beta = sigma * Q + omegaD * P
  let theta = Math.atan2(alpha, beta)
  if (theta <= 0) theta += Math.PI
  const timeS = theta / omegaD
  return { value: Math.abs(Math.exp(-sigma * timeS) * (P * Math.cos(theta) + Q * Math.sin(theta))), timeS }
}

export interface TailPeaks {
  u: { value: number; timeS: number }
  v: { value: number; timeS: number }
  /** Absolute acceleration −(2ζωv + ω²u); the ground is still after the record. */
  a: { value: number; timeS: number }
}

/**
 * Peaks of the free vibration that follows the record from its end state
 * (u, v): exact, at any length of tail from half a damped period to unbounded.
 * Times are measured from the end of the record.
 */
export function freeVibrationTailPeaks(uEnd: number, vEnd: number, omega: number, zeta: number): TailPeaks {
  const sigma = zeta * omega
  const omegaD = omega * Math.sqrt(1 - zeta * zeta)
  const k = omega * omega
  const uQ = (vEnd + sigma * uEnd) / omegaD
  const vQ = -(k * uEnd + sigma * vEnd) / omegaD
  return {
    u: firstExtremum(uEnd, uQ, sigma, omegaD),
    v: firstExtremum(vEnd, vQ, sigma, omegaD),
    a: firstExtremum(-(2 * sigma * vEnd + k * uEnd), -(2 * sigma * vQ + k * uQ), sigma, omegaD),
  }
}
