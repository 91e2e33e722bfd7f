/**
 * Suite statistics and amplitude scaling of response spectra against a target.
 *
 * All functions are pure: spectra in, numbers out. Ordinates may be in any one unit,
 * as long as records and target share it (the comparison service uses g).
 *
 * Ordinate is a calculation aid; the licensed engineer of record is responsible for its use;
 * the locally adopted code and edition govern. Passing a scaling rule here does not make a
 * record suitable for the site.
 */

/**
 * Interpolates y(x) at `atX`, linearly in ln x and ln y (straight lines on log–log axes),
 * which is how spectral ordinates are usually read between tabulated periods.
 *
 * `xs` must be positive and strictly increasing, `ys` positive. Points outside [xs[0], xs[n−1]]
 * answer NaN: the curve is never extrapolated.
 */
export function interpolateLogLog(
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  atX: ArrayLike<number>,
): Float64Array {
  const n = xs.length
  if (n !== ys.length) throw new RangeError('xs and ys must have the same length')
  if (n < 1) throw new RangeError('at least one point is needed to interpolate')
  for (let i = 0; i < n; i++) {
    const x = xs[i] as number
    const y = ys[i] as number
    if (!(x > 0) || !Number.isFinite(x)) throw new RangeError(`xs[${i}] must be a positive number`)
    if (!(y > 0) || !Number.isFinite(y)) throw new RangeError(`ys[${i}] must be a positive number`)
    if (i > 0 && !(x > (xs[i - 1] as number))) throw new RangeError('xs must be strictly increasing')
  }
  const out = new Float64Array(atX.length)
  let j = 0
  for (let k = 0; k < atX.length; k++) {
    const x = atX[k] as number
    const first = xs[0] as number
    const last = xs[n - 1] as number
    if (!(x >= first && x <= last)) {
      out[k] = NaN
      continue
    }
    if (x === last) {
      out[k] = ys[n - 1] as number
      continue
    }
    // atX is usually increasing, so the search resumes where it stopped.
    if (j > 0 && x < (xs[j] as number)) j = 0
    while (j < n - 2 && x >= (xs[j + 1] as number)) j++
    const x0 = xs[j] as number
    const x1 = xs[j + 1] as number
    const y0 = ys[j] as number
    const y1 = ys[j + 1] as number
    const w = Math.log(x / x0) / Math.log(x1 / x0)
    out[k] = Math.exp(Math.log(y0) + w * Math.log(y1 / y0))
  }
  return out
}

/** Does every grid match exactly? Then the first grid is used as is. */
function sameGrids(grids: ArrayLike<number>[]): boolean {
  const first = grids[0]
  if (!first) return true
  return grids.every((g) => g.length === first.length && Array.from(g).every((t, i) => t === first[i]))
}

/**
 * A period grid that every curve covers. When all curves share one grid, it is returned as is,
 * so no ordinate is interpolated. Otherwise: `perDecade` log-spaced periods over the overlap of
 * all grids (from the largest first period to the smallest last period).
 */
export function commonPeriodGrid(grids: ArrayLike<number>[], perDecade = 100): Float64Array {
  if (grids.length === 0) throw new RangeError('at least one period grid is needed')
  if (sameGrids(grids)) return Float64Array.from(grids[0] as ArrayLike<number>)
  let lo = -Infinity
  let hi = Infinity
  for (const g of grids) {
    if (g.length === 0) throw new RangeError('a period grid is empty')
    lo = Math.max(lo, g[0] as number)
    hi = Math.min(hi, g[g.length - 1] as number)
  }
  if (!(lo > 0) || !(hi > lo)) throw new RangeError('the curves have no period range in common')
  const count = Math.max(2, Math.round(Math.log10(hi / lo) * perDecade) + 1)
  const out = new Float64Array(count)
  const step = Math.log(hi / lo) / (count - 1)
  for (let i = 0; i < count; i++) out[i] = lo * Math.exp(step * i)
  out[0] = lo
  out[count - 1] = hi
  return out
}

export type SuiteMeanKind = 'arithmetic' | 'geometric'

export interface SuiteStatistics {
  kind: SuiteMeanKind
  mean: Float64Array
  /** Mean − 1σ and mean + 1σ; null with fewer than two curves. */
  lower: Float64Array | null
  upper: Float64Array | null
  /** σ of the ordinates (arithmetic) or of their natural logarithms (geometric). */
  sigma: Float64Array | null
  /** How the band is defined, for the chart legend. */
  label: string
}

/**
 * Suite mean and ±1σ band at each period of a common grid.
 * - arithmetic: m = Σy/n, σ = √(Σ(y − m)²/(n − 1)), band m ± σ;
 * - geometric: μ = Σ ln y / n, σ = √(Σ(ln y − μ)²/(n − 1)), mean e^μ, band e^(μ ± σ).
 * σ uses the sample (n − 1) denominator. Geometric needs positive ordinates.
 */
export function suiteStatistics(curves: ArrayLike<number>[], kind: SuiteMeanKind): SuiteStatistics {
  const n = curves.length
  if (n === 0) throw new RangeError('at least one curve is needed for a suite mean')
  const len = (curves[0] as ArrayLike<number>).length
  for (const c of curves) if (c.length !== len) throw new RangeError('all curves must share one grid')
  const mean = new Float64Array(len)
  const sigma = n >= 2 ? new Float64Array(len) : null
  const lower = n >= 2 ? new Float64Array(len) : null
  const upper = n >= 2 ? new Float64Array(len) : null
  const f = kind === 'geometric' ? Math.log : (v: number) => v
  for (let i = 0; i < len; i++) {
    let sum = 0
    for (const c of curves) sum += f(c[i] as number)
    const m = sum / n
    let ss = 0
    for (const c of curves) {
      const d = f(c[i] as number) - m
      ss += d * d
    }
    const s = n >= 2 ? Math.sqrt(ss / (n - 1)) : NaN
    if (kind === 'geometric') {
      mean[i] = Math.exp(m)
      if (sigma && lower && upper) {
        sigma[i] = s
        lower[i] = Math.exp(m - s)
        upper[i] = Math.exp(m + s)
      }
    } else {
      mean[i] = m
      if (sigma && lower && upper) {
        sigma[i] = s
        lower[i] = m - s
        upper[i] = m + s
      }
    }
  }
  const label = kind === 'geometric' ? 'Geometric mean ± 1σ of ln PSA' : 'Arithmetic mean ± 1σ'
  return { kind, mean, lower, upper, sigma, label }
}

/** Indices of the grid periods inside [fromS, toS]; throws when none fall inside. */
export function periodRangeIndices(periodsS: ArrayLike<number>, fromS: number, toS: number): number[] {
  if (!(fromS > 0) || !(toS > fromS)) throw new RangeError('the period range needs 0 < from < to')
  const idx: number[] = []
  for (let i = 0; i < periodsS.length; i++) {
    const t = periodsS[i] as number
    if (t >= fromS && t <= toS) idx.push(i)
  }
  if (idx.length === 0) throw new RangeError(`no period of the grid lies in [${fromS}, ${toS}] s`)
  return idx
}

function checkTargetDefined(periodsS: ArrayLike<number>, target: ArrayLike<number>, idx: number[]) {
  for (const i of idx) {
    const v = target[i] as number
    if (!(v > 0) || !Number.isFinite(v)) {
      throw new RangeError(`the target is not defined at T = ${periodsS[i]} s, inside the scaling range`)
    }
  }
}

/**
 * The amplitude factor f minimising Σ (ln(f·y(T)) − ln target(T))² over the grid periods T in
 * [fromS, toS]. Setting the derivative in ln f to zero gives
 *   ln f = (1/m) Σ ln(target(T)/y(T)),
 * the geometric mean of the target-to-record ratios (least squares in log space; each grid
 * period weighs the same, so a log-spaced grid weighs the range evenly in ln T).
 */
export function logLeastSquaresScaleFactor(
  periodsS: ArrayLike<number>,
  record: ArrayLike<number>,
  target: ArrayLike<number>,
  fromS: number,
  toS: number,
): number {
  const idx = periodRangeIndices(periodsS, fromS, toS)
  checkTargetDefined(periodsS, target, idx)
  let sum = 0
  for (const i of idx) {
    const y = record[i] as number
    if (!(y > 0)) throw new RangeError(`the record ordinate at T = ${periodsS[i]} s must be positive`)
    sum += Math.log((target[i] as number) / y)
  }
  return Math.exp(sum / idx.length)
}

export type ScalingRule = 'lsq-log' | 'suite-90'

/** How each rule is stated on the chart and in the table; no code clause is claimed. */
export const SCALING_RULE_LABELS: Readonly<Record<ScalingRule, string>> = {
  'lsq-log': 'Each record scaled by least squares in ln PSA over the period range',
  'suite-90':
    'One factor for the whole suite: the smallest that keeps the suite mean at or above 90% of the target over the period range',
}

export interface SuiteCheck {
  /** True when the scaled suite mean is at or above 90% of the target at every grid period in range. */
  passed: boolean
  /** min over the range of mean/target. */
  minRatio: number
  /** The period where that minimum occurs. */
  governingPeriodS: number
  label: string
}

export interface SuiteScaling {
  rule: ScalingRule
  ruleLabel: string
  fromS: number
  toS: number
  /** One factor per record, in the order given. */
  factors: number[]
  /** The suite mean of the scaled records, on the grid. */
  scaledMean: Float64Array
  check: SuiteCheck
}

/** Scaled suite mean against 90% of the target over the range: pass when never below. */
export function suiteCheck(
  periodsS: ArrayLike<number>,
  scaledMean: ArrayLike<number>,
  target: ArrayLike<number>,
  fromS: number,
  toS: number,
  meanKind: SuiteMeanKind,
): SuiteCheck {
  const idx = periodRangeIndices(periodsS, fromS, toS)
  checkTargetDefined(periodsS, target, idx)
  let minRatio = Infinity
  let governing = periodsS[idx[0] as number] as number
  for (const i of idx) {
    const r = (scaledMean[i] as number) / (target[i] as number)
    if (r < minRatio) {
      minRatio = r
      governing = periodsS[i] as number
    }
  }
  // A relative tolerance of 1e-12 keeps the suite-90 factor, which makes the mean touch 90%
  // exactly at the governing period, from failing on rounding.
  const passed = minRatio >= 0.9 * (1 - 1e-12)
  return {
    passed,
    minRatio,
    governingPeriodS: governing,
    label: `Scaled ${meanKind} mean ≥ 90% of the target at every period in [${fromS}, ${toS}] s`,
  }
}

/**
 * Scale factors for a suite under one rule, and the check of the scaled suite mean.
 * - `lsq-log`: each record by {@link logLeastSquaresScaleFactor};
 * - `suite-90`: one factor F for all records, F = max over T in range of 0.9·target(T)/mean(T),
 *   the smallest factor for which the scaled mean stays at or above 90% of the target (every
 *   mean kind here is proportional to a common factor, so the scaled mean is F·mean).
 */
export function scaleSuite(
  periodsS: ArrayLike<number>,
  curves: ArrayLike<number>[],
  target: ArrayLike<number>,
  options: { fromS: number; toS: number; rule: ScalingRule; meanKind: SuiteMeanKind },
): SuiteScaling {
  const { fromS, toS, rule, meanKind } = options
  if (curves.length === 0) throw new RangeError('at least one record is needed to scale a suite')
  let factors: number[]
  if (rule === 'lsq-log') {
    factors = curves.map((c) => logLeastSquaresScaleFactor(periodsS, c, target, fromS, toS))
  } else {
    const idx = periodRangeIndices(periodsS, fromS, toS)
    checkTargetDefined(periodsS, target, idx)
    const { mean } = suiteStatistics(curves, meanKind)
    let factor = 0
    for (const i of idx) factor = Math.max(factor, (0.9 * (target[i] as number)) / (mean[i] as number))
    factors = curves.map(() => factor)
  }
  const scaled = curves.map((c, k) => Float64Array.from(c, (v) => v * (factors[k] as number)))
  const scaledMean = suiteStatistics(scaled, meanKind).mean
  return {
    rule,
    ruleLabel: SCALING_RULE_LABELS[rule],
    fromS,
    toS,
    factors,
    scaledMean,
    check: suiteCheck(periodsS, scaledMean, target, fromS, toS, meanKind),
  }
}

/** One subject of a suite as its cautions see it: a run of one record, or of a pair of two. */
export interface SuiteSubject {
  /** The run's name in the comparison (its legend label). */
  label: string
  /** The record (one) or the pair's two components. */
  records: { id: string; name: string }[]
  pair: boolean
}

/**
 * The usual smallest suite for response-history analysis under a code, by the target's kind:
 * ASCE 7 asks for at least 11 ground motions (pairs, for three-dimensional analysis) and
 * EN 1998-1 for at least 3 (both from memory; the locally adopted edition governs).
 */
export const SUITE_MINIMUMS: Readonly<Record<string, { code: string; count: number; unit: string }>> = {
  'asce7-two-period': { code: 'ASCE 7', count: 11, unit: 'ground motions (pairs for 3-D analysis)' },
  'en1998-1': { code: 'EN 1998-1', count: 3, unit: 'ground motions' },
}

/**
 * Cautions about the make-up of a suite: a record counted more than once (alone and inside a
 * pair, or in two runs), and fewer subjects than the target code's usual minimum.
 */
export function suiteCautions(subjects: readonly SuiteSubject[], targetKind: string | null): string[] {
  const cautions: string[] = []
  const seen = new Map<string, { name: string; in: string[] }>()
  for (const subject of subjects) {
    for (const record of subject.records) {
      const entry = seen.get(record.id) ?? { name: record.name, in: [] }
      entry.in.push(subject.pair ? `inside the pair “${subject.label}”` : `alone as “${subject.label}”`)
      seen.set(record.id, entry)
    }
  }
  for (const { name, in: places } of seen.values()) {
    if (places.length > 1) {
      cautions.push(
        `The record “${name}” is counted ${places.length} times in this suite (${places.join('; ')}), which weights it in the mean more than the others.`,
      )
    }
  }
  const minimum = targetKind ? SUITE_MINIMUMS[targetKind] : undefined
  if (minimum && subjects.length < minimum.count) {
    cautions.push(
      `The suite has ${subjects.length} of the ${minimum.count} ${minimum.unit} that ${minimum.code} usually asks for in response-history analysis (from memory; the locally adopted code governs).`,
    )
  }
  return cautions
}
