export interface DecimatedSeries {
  /** Sample times, s, evenly spaced. */
  timeS: Float64Array
  /** The series in the order given, each as long as timeS. */
  series: Float64Array[]
}

/**
 * Thins evenly sampled series (all of one length, spaced dtS) to at most maxPoints points for
 * plotting. When they already fit, every sample is kept at t = i·dtS. Otherwise the samples are
 * cut into buckets of b = ⌈n / ⌊maxPoints/2⌋⌉ and each bucket gives, for every series, its
 * lowest and highest value in the order they occur, placed at the bucket's start and middle
 * (t = k·b·dtS and (k·b + b/2)·dtS). So every series keeps its extreme values exactly, the
 * time axis stays uniform (spacing b·dtS/2), and a peak is displaced in time by less than one
 * bucket (b·dtS). This is the usual min/max decimation for drawing signals (common practice).
 */
export function decimateMinMax(
  series: readonly Float64Array[],
  dtS: number,
  maxPoints: number,
): DecimatedSeries {
  if (!(dtS > 0)) throw new RangeError('dtS must be positive')
  if (!Number.isInteger(maxPoints) || maxPoints < 2) throw new RangeError('maxPoints must be an integer ≥ 2')
  const n = series[0]?.length ?? 0
  for (const s of series) if (s.length !== n) throw new RangeError('every series must have the same length')

  if (n <= maxPoints) {
    const timeS = new Float64Array(n)
    for (let i = 0; i < n; i++) timeS[i] = i * dtS
    return { timeS, series: series.map((s) => Float64Array.from(s)) }
  }

  const half = Math.floor(maxPoints / 2)
  const bucket = Math.ceil(n / half)
  const buckets = Math.ceil(n / bucket)
  const timeS = new Float64Array(2 * buckets)
  for (let k = 0; k < buckets; k++) {
    timeS[2 * k] = k * bucket * dtS
    timeS[2 * k + 1] = (k * bucket + bucket / 2) * dtS
  }
  const out = series.map((s) => {
    const thinned = new Float64Array(2 * buckets)
    for (let k = 0; k < buckets; k++) {
      const start = k * bucket
      const end = Math.min(n, start + bucket)
      let lo = start
      let hi = start
      for (let i = start + 1; i < end; i++) {
        const v = s[i]!
        if (v < s[lo]!) lo = i
        if (v > s[hi]!) hi = i
      }
      thinned[2 * k] = s[Math.min(lo, hi)]!
      thinned[2 * k + 1] = s[Math.max(lo, hi)]!
    }
    return thinned
  })
  return { timeS, series: out }
}
