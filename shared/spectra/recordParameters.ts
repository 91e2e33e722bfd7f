/**
 * Ground-motion parameters of an acceleration record (SI units).
 *
 * The record is taken as linearly interpolated between samples, the same
 * model the oscillator sweep uses, and everything here is exact for it:
 * velocity is quadratic and displacement cubic between samples, PGV and PGD
 * are the extremes of those curves (not just their values at the samples),
 * and the integrals of a² (Arias) and |a| are exact.
 *
 * CAV here is the plain integral ∫|a| dt over the whole record. The
 * standardized CAV (EPRI 1991, from memory: ∫|a| dt summed over the
 * non-overlapping 1 s windows whose peak |a| reaches 0.025 g) is a different
 * number, given by {@link standardizedCav}.
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
  /** Plain cumulative absolute velocity ∫|a| dt over the whole record ({@link CAV_LABEL}); not the standardized CAV. */
  cavMPerS: number
}

/** The label of {@link RecordParameters.cavMPerS} for pages, sheets and files. */
export const CAV_LABEL = 'CAV, plain ∫|a| dt'
/** The label of {@link standardizedCav}. */
export const STANDARDIZED_CAV_LABEL = 'Standardized CAV (1 s windows reaching 0.025 g)'

export interface IntegratedRecord {
  velMPerS: Float64Array
  dispM: Float64Array
}

function checkRecord(accelMPerS2: Float64Array, dtS: number): void {
  if (!(Number.isFinite(dtS) && dtS > 0)) throw new RangeError('dtS must be a positive number of seconds')
  if (accelMPerS2.length < 2) throw new RangeError('the record needs at least two samples')
}

/**
 * Ground velocity and displacement of the linearly interpolated record, from rest, exact at the
 * samples: v[i+1] = v[i] + Δt·(a[i] + a[i+1])/2 (the trapezoidal rule, exact for a linear a) and
 * d[i+1] = d[i] + Δt·v[i] + Δt²·(a[i]/3 + a[i+1]/6) (exact for the quadratic v).
 * No baseline correction is applied.
 */
export function integrateRecord(accelMPerS2: Float64Array, dtS: number): IntegratedRecord {
  checkRecord(accelMPerS2, dtS)
  const n = accelMPerS2.length
  const velMPerS = new Float64Array(n)
  const dispM = new Float64Array(n)
  const half = dtS / 2
  const dt2 = dtS * dtS
  for (let i = 1; i < n; i++) {
    const a0 = accelMPerS2[i - 1]!
    const a1 = accelMPerS2[i]!
    velMPerS[i] = velMPerS[i - 1]! + half * (a0 + a1)
    dispM[i] = dispM[i - 1]! + dtS * velMPerS[i - 1]! + dt2 * (a0 / 3 + a1 / 6)
  }
  return { velMPerS, dispM }
}

function peakAbs(series: Float64Array): number {
  let peak = 0
  for (let i = 0; i < series.length; i++) peak = Math.max(peak, Math.abs(series[i]!))
  return peak
}

/**
 * PGV and PGD of the linearly interpolated record: the largest |v| and |d| at the samples and at
 * the interior extremes of each interval, where v(τ) = v₀ + a₀τ + sτ²/2 is stationary at a = 0
 * and d(τ) = d₀ + v₀τ + a₀τ²/2 + sτ³/6 at the roots of v (s the interval's slope).
 */
export function interpolatedPeaks(
  accelMPerS2: Float64Array,
  dtS: number,
  { velMPerS, dispM }: IntegratedRecord,
): { pgvMPerS: number; pgdM: number } {
  let pgv = peakAbs(velMPerS)
  let pgd = peakAbs(dispM)
  const inside = (tau: number) => tau > 0 && tau < dtS
  for (let i = 0; i + 1 < accelMPerS2.length; i++) {
    const a0 = accelMPerS2[i]!
    const s = (accelMPerS2[i + 1]! - a0) / dtS
    const v0 = velMPerS[i]!
    const d0 = dispM[i]!
    if (s !== 0 && inside(-a0 / s)) pgv = Math.max(pgv, Math.abs(v0 - (a0 * a0) / (2 * s)))
    const dAt = (tau: number) => d0 + tau * (v0 + tau * (a0 / 2 + (s * tau) / 6))
    // Roots of v(τ) = (s/2)τ² + a₀τ + v₀.
    if (s === 0) {
      if (a0 !== 0 && inside(-v0 / a0)) pgd = Math.max(pgd, Math.abs(dAt(-v0 / a0)))
      continue
    }
    const disc = a0 * a0 - 2 * s * v0
    if (disc < 0) continue
    const q = -(a0 + Math.sign(a0 || 1) * Math.sqrt(disc))
    for (const tau of [q / s, q !== 0 ? (2 * v0) / q : Number.NaN]) {
      if (inside(tau)) pgd = Math.max(pgd, Math.abs(dAt(tau)))
    }
  }
  return { pgvMPerS: pgv, pgdM: pgd }
}

/**
 * Standardized CAV (EPRI 1991, from memory): the record is cut into non-overlapping 1 s windows
 * from its first sample, and ∫|a| dt (exact for the interpolated record) is summed over the
 * windows whose peak |a| reaches 0.025 g. A last, shorter window counts the same way.
 */
export function standardizedCav(accelMPerS2: Float64Array, dtS: number): number {
  checkRecord(accelMPerS2, dtS)
  const threshold = 0.025 * STANDARD_GRAVITY_M_PER_S2
  let total = 0
  let window = 0
  let windowArea = 0
  let windowPeak = 0
  for (let i = 1; i < accelMPerS2.length; i++) {
    // The interval [t(i−1), t(i)] belongs to the window holding its start.
    const index = Math.floor(((i - 1) * dtS) / 1 + 1e-9)
    if (index !== window) {
      if (windowPeak >= threshold) total += windowArea
      window = index
      windowArea = 0
      windowPeak = 0
    }
    const a0 = accelMPerS2[i - 1]!
    const a1 = accelMPerS2[i]!
    windowArea += absArea(a0, a1, dtS)
    windowPeak = Math.max(windowPeak, Math.abs(a0), Math.abs(a1))
  }
  if (windowPeak >= threshold) total += windowArea
  return total
}

/** ∫|a| dt over one step where a is linear from a0 to a1 (exact, also across a sign change). */
function absArea(a0: number, a1: number, dtS: number): number {
  if (a0 * a1 >= 0) return (dtS * (Math.abs(a0) + Math.abs(a1))) / 2
  return (dtS * (a0 * a0 + a1 * a1)) / (2 * (Math.abs(a0) + Math.abs(a1)))
}

export function recordParameters(accelMPerS2: Float64Array, dtS: number): RecordParameters {
  const integrated = integrateRecord(accelMPerS2, dtS)
  const { pgvMPerS, pgdM } = interpolatedPeaks(accelMPerS2, dtS, integrated)
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
    pgvMPerS,
    pgdM,
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
  const integrated = integrateRecord(accelMPerS2, dtS)
  const { velMPerS, dispM } = integrated
  const n = accelMPerS2.length
  const pga = peakAbs(accelMPerS2)
  const { pgvMPerS: pgv, pgdM: pgd } = interpolatedPeaks(accelMPerS2, dtS, integrated)
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
