/**
 * Period grids for response spectra.
 */

/**
 * `count` periods spaced evenly in log10 from `minS` to `maxS`, both included.
 * Exponents are formed as lo + ((hi − lo)·i)/(count − 1) so that a grid whose
 * decades fall on whole steps hits 0.01, 0.1, 1 and 10 s exactly.
 */
export function logPeriodGrid(minS: number, maxS: number, count: number): number[] {
  if (!(Number.isFinite(minS) && minS > 0)) throw new RangeError('minS must be a positive number of seconds')
  if (!(Number.isFinite(maxS) && maxS >= minS))
    throw new RangeError('maxS must be a number of seconds ≥ minS')
  if (!(Number.isInteger(count) && count >= 1)) throw new RangeError('count must be a positive integer')
  if (count === 1) return [minS]
  if (minS === maxS) throw new RangeError('minS and maxS must differ when count > 1')
  const lo = Math.log10(minS)
  const hi = Math.log10(maxS)
  const periods = new Array<number>(count)
  for (let i = 0; i < count; i++) periods[i] = 10 ** (lo + ((hi - lo) * i) / (count - 1))
  periods[0] = minS
  periods[count - 1] = maxS
  return periods
}

/** The default grid: 100 periods per decade from 0.01 s to 10 s, 301 in all. */
export const DEFAULT_PERIOD_GRID: readonly number[] = Object.freeze(logPeriodGrid(0.01, 10, 301))

/** A fresh copy of {@link DEFAULT_PERIOD_GRID}. */
export function defaultPeriodsS(): number[] {
  return DEFAULT_PERIOD_GRID.slice()
}
