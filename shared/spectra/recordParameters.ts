/**
 * Ground-motion parameters of an acceleration record (SI units).
 *
 * The record is taken as linearly interpolated between samples, the same
 * model the oscillator sweep uses. Velocity and displacement come from the
 * trapezoidal rule; the integrals of a² (Arias) and |a| (CAV) are exact for
 * the interpolated record.
 */
import { STANDARD_GRAVITY_M_PER_S2 } from './units.js'

export interface RecordParameters {
  points: number
  dtS: number
  /** (points − 1)·Δt, the span from the first sample to the last. */
  durationS: number
  pgaMPerS2: number
  pgvMPerS: number
  pgdM: number
  /** Arias intensity Ia = π/(2g)·∫a² dt (Arias 1970). */
  ariasMPerS: number
  /** Significant duration D5-95 between 5% and 95% of the Husid curve (Trifunac & Brady 1975). */
  d595S: number
  /** Cumulative absolute velocity ∫|a| dt. */
  cavMPerS: number
}

export interface IntegratedRecord {
  velMPerS: Float64Array
  dispM: Float64Array
}

function checkRecord(accelMPerS2: Float64Array, dtS: number): void {
  if (!(Number.isFinite(dtS) && dtS > 0)) throw new RangeError('dtS must be a positive number of seconds')
  if (accelMPerS2.length < 2) throw new RangeError('the record needs at least two samples')
}

/**
 * Ground velocity and displacement by the trapezoidal rule, from rest:
 * v[i+1] = v[i] + Δt/2·(a[i] + a[i+1]), d[i+1] = d[i] + Δt/2·(v[i] + v[i+1]).
 * No baseline correction is applied.
 */
export function integrateRecord(accelMPerS2: Float64Array, dtS: number): IntegratedRecord {
  checkRecord(accelMPerS2, dtS)
  const n = accelMPerS2.length
  const velMPerS = new Float64Array(n)
  const dispM = new Float64Array(n)
  const half = dtS / 2
  for (let i = 1; i < n; i++) {
    velMPerS[i] = velMPerS[i - 1]! + half * (accelMPerS2[i - 1]! + accelMPerS2[i]!)
    dispM[i] = dispM[i - 1]! + half * (velMPerS[i - 1]! + velMPerS[i]!)
  }
  return { velMPerS, dispM }
}

function peakAbs(series: Float64Array): number {
  let peak = 0
  for (let i = 0; i < series.length; i++) peak = Math.max(peak, Math.abs(series[i]!))
  return peak
}

/** ∫|a| dt over one step where a is linear from a0 to a1 (exact, also across a sign change). */
function absArea(a0: number, a1: number, dtS: number): number {
  if (a0 * a1 >= 0) return (dtS * (Math.abs(a0) + Math.abs(a1))) / 2
  return (dtS * (a0 * a0 + a1 * a1)) / (2 * (Math.abs(a0) + Math.abs(a1)))
}

export function recordParameters(accelMPerS2: Float64Array, dtS: number): RecordParameters {
  const { velMPerS, dispM } = integrateRecord(accelMPerS2, dtS)
  const n = accelMPerS2.length
  // Husid curve: running ∫a² dt, exact for a linear between samples: Δt(a0² + a0a1 + a1²)/3.
  const husid = new Float64Array(n)
  let cav = 0
  for (let i = 1; i < n; i++) {
    const a0 = accelMPerS2[i - 1]!
    const a1 = accelMPerS2[i]!
    husid[i] = husid[i - 1]! + (dtS * (a0 * a0 + a0 * a1 + a1 * a1)) / 3
    cav += absArea(a0, a1, dtS)
  }
  const total = husid[n - 1]!
  return {
    points: n,
    dtS,
    durationS: (n - 1) * dtS,
    pgaMPerS2: peakAbs(accelMPerS2),
    pgvMPerS: peakAbs(velMPerS),
    pgdM: peakAbs(dispM),
    ariasMPerS: (Math.PI / (2 * STANDARD_GRAVITY_M_PER_S2)) * total,
    d595S: total > 0 ? crossingTime(husid, 0.95 * total, dtS) - crossingTime(husid, 0.05 * total, dtS) : 0,
    cavMPerS: cav,
  }
}

/** First time the non-decreasing Husid curve reaches `level`, interpolating linearly within the step. */
function crossingTime(husid: Float64Array, level: number, dtS: number): number {
  let lo = 0
  let hi = husid.length - 1
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1
    if (husid[mid]! >= level) hi = mid
    else lo = mid
  }
  const h0 = husid[lo]!
  const h1 = husid[hi]!
  if (h0 >= level) return lo * dtS
  return (lo + (level - h0) / (h1 - h0)) * dtS
}

/** Thresholds for the non-blocking record warnings (common practice, not from a standard). */
export const RECORD_WARNING_LIMITS = {
  /** Final integrated displacement as a fraction of PGD that suggests baseline drift. */
  driftFractionOfPgd: 0.5,
  /** Final integrated velocity as a fraction of PGV that suggests a baseline offset. */
  residualVelocityFractionOfPgv: 0.1,
  /** First sample as a fraction of PGA that suggests the start of the motion is missing. */
  startFractionOfPga: 0.05,
} as const

/**
 * Warnings an engineer should see before trusting a record, none of which
 * blocks a run: drift of the integrated displacement and velocity (an
 * uncorrected baseline), and a first sample far from zero.
 */
export function recordWarnings(accelMPerS2: Float64Array, dtS: number): string[] {
  const warnings: string[] = []
  const { velMPerS, dispM } = integrateRecord(accelMPerS2, dtS)
  const n = accelMPerS2.length
  const pga = peakAbs(accelMPerS2)
  const pgv = peakAbs(velMPerS)
  const pgd = peakAbs(dispM)
  const finalVel = velMPerS[n - 1]!
  const finalDisp = dispM[n - 1]!
  const percent = (x: number) => `${(100 * x).toFixed(0)}%`
  if (pgv > 0 && Math.abs(finalVel) > RECORD_WARNING_LIMITS.residualVelocityFractionOfPgv * pgv) {
    warnings.push(
      `Integrated ground velocity ends at ${finalVel.toPrecision(3)} m/s, ${percent(Math.abs(finalVel) / pgv)} of PGV: the baseline may need correction.`,
    )
  }
  if (pgd > 0 && Math.abs(finalDisp) > RECORD_WARNING_LIMITS.driftFractionOfPgd * pgd) {
    warnings.push(
      `Integrated ground displacement drifts to ${finalDisp.toPrecision(3)} m at the end, ${percent(Math.abs(finalDisp) / pgd)} of PGD: long-period ordinates may be unreliable without baseline correction.`,
    )
  }
  const first = accelMPerS2[0]!
  if (pga > 0 && Math.abs(first) > RECORD_WARNING_LIMITS.startFractionOfPga * pga) {
    warnings.push(
      `The record starts at ${percent(Math.abs(first) / pga)} of PGA instead of near zero: the start of the motion may be missing.`,
    )
  }
  return warnings
}
