/**
 * Closed-form responses of the linear oscillator, used as check values:
 *   ü + 2ζω u̇ + ω² u = f(t)  (force per unit mass; f = −a_g for ground motion).
 */

/**
 * Response from rest to f(t) = f0·sin(ω̄t), steady state plus transient
 * (Chopra, Dynamics of Structures, sec. 3.1–3.2, eqs. 3.1.6 and 3.2.1–3.2.4):
 *   u = e^(−ζωt)(A cos ω_D t + B sin ω_D t) + C sin ω̄t + D cos ω̄t,
 *   C = (f0/ω²)(1 − r²)/Δ, D = −(f0/ω²)(2ζr)/Δ, Δ = (1 − r²)² + (2ζr)², r = ω̄/ω,
 * with A, B from rest. Undamped resonance (ζ = 0, r = 1):
 *   u = (f0/(2ω²))(sin ωt − ωt cos ωt).
 */
export function harmonicResponse(
  f0: number,
  forcingOmega: number,
  omega: number,
  zeta: number,
  tS: number,
): { u: number; v: number } {
  if (zeta === 0 && forcingOmega === omega) {
    const s = f0 / (2 * omega * omega)
    return {
      u: s * (Math.sin(omega * tS) - omega * tS * Math.cos(omega * tS)),
      v: 0.5 * f0 * tS * Math.sin(omega * tS),
    }
  }
  const r = forcingOmega / omega
  const staticU = f0 / (omega * omega)
  const denominator = (1 - r * r) ** 2 + (2 * zeta * r) ** 2
  const C = (staticU * (1 - r * r)) / denominator
  const D = (-staticU * 2 * zeta * r) / denominator
  const sigma = zeta * omega
  const omegaD = omega * Math.sqrt(1 - zeta * zeta)
  const A = -D
  const B = (sigma * A - forcingOmega * C) / omegaD
  const decay = Math.exp(-sigma * tS)
  const cosD = Math.cos(omegaD * tS)
  const sinD = Math.sin(omegaD * tS)
  const cosF = Math.cos(forcingOmega * tS)
  const sinF = Math.sin(forcingOmega * tS)
  return {
    u: decay * (A * cosD + B * sinD) + C * sinF + D * cosF,
    v:
      decay * ((-sigma * A + omegaD * B) * cosD + (-sigma * B - omegaD * A) * sinD) +
      forcingOmega * (C * cosF - D * sinF),
  }
}

/**
 * Peak response to a step of ground acceleration a₀ from rest, as a ratio of
 * PSA to a₀: 1 + e^(−πζ/√(1−ζ²)), reached at half a damped period (Chopra,
 * Dynamics of Structures, ch. 4, response to a step force).
 */
export function stepOvershootRatio(zeta: number): number {
  return 1 + Math.exp((-Math.PI * zeta) / Math.sqrt(1 - zeta * zeta))
}
