/**
 * Reading a spectrum at periods that may fall between the periods it was computed at.
 * Spectra are close to straight lines between neighbouring periods on log-log axes, so the
 * reading is interpolated linearly in (ln T, ln S), the usual way of tabulating spectra
 * between computed periods (common practice).
 * Nothing is extrapolated beyond the computed range.
 */
import { interpolateLogLog } from '../spectra/suite.js'

/** The periods a calc-package table reads, in seconds (issue 8); T = 0 stands for the PGA. */
export const STANDARD_PERIODS_S: readonly number[] = [0.05, 0.1, 0.2, 0.3, 0.5, 0.75, 1, 1.5, 2, 3, 4, 5]

/** Two periods closer than this, relatively, are the same grid period. */
const SAME_PERIOD_RELATIVE = 1e-9

export type OrdinateReading =
  | { kind: 'grid'; value: number }
  | { kind: 'interpolated'; value: number; fromS: number; toS: number }
  | { kind: 'outside' }

/**
 * The spectrum `values` (computed at `periodsS`, in any order) read at `periodS`:
 * - the computed value when `periodS` is on the grid (within a relative 1e-9);
 * - else log-log interpolation between the nearest computed periods either side;
 *   where either neighbour is not positive (a log is undefined), linear in ln T instead;
 * - `outside` when `periodS` lies beyond the computed range.
 */
export function ordinateAtPeriod(
  periodsS: ArrayLike<number>,
  values: ArrayLike<number>,
  periodS: number,
): OrdinateReading {
  if (periodsS.length !== values.length) {
    throw new RangeError(`${periodsS.length} periods but ${values.length} values`)
  }
  if (!(periodS > 0) || !Number.isFinite(periodS)) {
    throw new RangeError('periodS must be a positive, finite number of seconds')
  }
  let below = -1
  let above = -1
  for (let i = 0; i < periodsS.length; i++) {
    const t = periodsS[i] as number
    if (Math.abs(t - periodS) <= SAME_PERIOD_RELATIVE * periodS) {
      return { kind: 'grid', value: values[i] as number }
    }
    if (t < periodS && (below < 0 || t > (periodsS[below] as number))) below = i
    if (t > periodS && (above < 0 || t < (periodsS[above] as number))) above = i
  }
  if (below < 0 || above < 0) return { kind: 'outside' }
  const t0 = periodsS[below] as number
  const t1 = periodsS[above] as number
  const v0 = values[below] as number
  const v1 = values[above] as number
  const value =
    v0 > 0 && v1 > 0
      ? (interpolateLogLog([t0, t1], [v0, v1], [periodS])[0] as number)
      : v0 + (Math.log(periodS / t0) / Math.log(t1 / t0)) * (v1 - v0)
  return { kind: 'interpolated', value, fromS: t0, toS: t1 }
}

/** The largest value and the period it was computed at (the first such period on a tie). */
export function peakOrdinate(
  periodsS: ArrayLike<number>,
  values: ArrayLike<number>,
): { value: number; periodS: number } | null {
  let best = -1
  for (let i = 0; i < values.length; i++) {
    const v = values[i] as number
    if (!Number.isFinite(v)) continue
    if (best < 0 || v > (values[best] as number)) best = i
  }
  return best < 0 ? null : { value: values[best] as number, periodS: periodsS[best] as number }
}
