/**
 * Orientation-independent combinations of two horizontal components (Boore 2010, BSSA 100(4),
 * "Orientation-independent, nongeometric-mean measures of seismic intensity from two horizontal
 * components of motion").
 *
 * The oscillator is linear, so the response to the rotated ground motion
 * a(θ,t) = a₁(t)cosθ + a₂(t)sinθ is u(θ,t) = u₁(t)cosθ + u₂(t)sinθ: each oscillator is solved
 * once per component, and the rotation is applied to the two response histories. RotDnn is the
 * nn-th percentile over the angles θ = 0°, 1°, …, 179° of the peak max_t |u(θ,t)|: RotD100 the
 * largest, RotD50 the median (the mean of the 90th and 91st of the 180 sorted peaks — the even-count
 * median convention is from memory).
 */

/** Angles 0°–179° in 1° steps (Boore 2010): 180 non-redundant orientations. */
export const ROTATION_ANGLE_COUNT = 180

const COS = new Float64Array(ROTATION_ANGLE_COUNT)
const SIN = new Float64Array(ROTATION_ANGLE_COUNT)
for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
  COS[k] = Math.cos((k * Math.PI) / 180)
  SIN[k] = Math.sin((k * Math.PI) / 180)
}

/**
 * Peaks max_t |h₁(t)cosθ + h₂(t)sinθ| for θ = 0°…179°, into `out` (length 180).
 *
 * Exact, and fast: |h₁cosθ + h₂sinθ| ≤ √(h₁² + h₂²), so a sample whose resultant does not exceed
 * the smallest peak found so far cannot raise any peak and is skipped. After the strong shaking
 * almost every sample is skipped, so the cost is close to one pass over the histories.
 */
export function rotatedPeaks(
  h1: ArrayLike<number>,
  h2: ArrayLike<number>,
  out: Float64Array = new Float64Array(ROTATION_ANGLE_COUNT),
): Float64Array {
  if (h1.length !== h2.length) throw new RangeError('the two component histories must have the same length')
  if (out.length !== ROTATION_ANGLE_COUNT) throw new RangeError(`out must hold ${ROTATION_ANGLE_COUNT} peaks`)
  out.fill(0)
  let floor2 = 0
  const n = h1.length
  for (let i = 0; i < n; i++) {
    const x = h1[i] as number
    const y = h2[i] as number
    if (x * x + y * y <= floor2) continue
    let floor = Infinity
    for (let k = 0; k < ROTATION_ANGLE_COUNT; k++) {
      const v = Math.abs(x * (COS[k] as number) + y * (SIN[k] as number))
      const p = v > (out[k] as number) ? (out[k] = v) : (out[k] as number)
      if (p < floor) floor = p
    }
    floor2 = floor * floor
  }
  return out
}

/** RotD100 and RotD50 of a set of 180 rotated peaks. `scratch` avoids an allocation per call. */
export function rotDFromPeaks(
  peaks: Float64Array,
  scratch: Float64Array = new Float64Array(ROTATION_ANGLE_COUNT),
): { rotD50: number; rotD100: number } {
  scratch.set(peaks)
  scratch.sort()
  const n = scratch.length
  const rotD100 = scratch[n - 1] as number
  const rotD50 =
    n % 2 === 0
      ? ((scratch[n / 2 - 1] as number) + (scratch[n / 2] as number)) / 2
      : (scratch[(n - 1) / 2] as number)
  return { rotD50, rotD100 }
}

/** RotD50 and RotD100 of two response histories of one oscillator. */
export function rotD(h1: ArrayLike<number>, h2: ArrayLike<number>): { rotD50: number; rotD100: number } {
  return rotDFromPeaks(rotatedPeaks(h1, h2))
}

/** Peak of |h| over the history. */
export function peakAbs(h: ArrayLike<number>): number {
  let p = 0
  for (let i = 0; i < h.length; i++) {
    const v = Math.abs(h[i] as number)
    if (v > p) p = v
  }
  return p
}

/**
 * Geometric mean of the two components' spectral ordinates, √(S₁·S₂) (the as-recorded geometric
 * mean; Boore et al. 2006, BSSA 96(4A), discuss why it depends on sensor orientation).
 */
export function geometricMeanOrdinate(s1: number, s2: number): number {
  return Math.sqrt(s1 * s2)
}
