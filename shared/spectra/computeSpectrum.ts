/**
 * Elastic response spectra of a run's subject, a ground-acceleration record or a pair of
 * horizontal components: for each damping ratio ζ and period T, the peaks of the unit-mass
 * oscillator
 *   u'' + 2ζω u' + ω² u = −a_g(t),  ω = 2π/T,  at rest at the first sample,
 * with a_g interpolated linearly between samples and the ground still after the last one:
 *   SD = max|u|, SV = max|u'| (relative), SA = max|u'' + a_g| = max|2ζωu' + ω²u|,
 *   PSV = ω·SD, PSA = ω²·SD.
 * For a pair, the same peaks are taken in every direction of the rotated motion and combined
 * (rotd.ts). Sub-steps are chosen per oscillator (see subSteps.ts) and refined by one driver for
 * both subjects, so that each reported ordinate is within 0.5% of the exact response for T in
 * 0.01–10 s and ζ in 0–30%. Deterministic: the same input gives the same bits, with either kernel.
 */
import { COMBINATIONS, type Combination } from '../vocabulary/combinations.js'
import {
  type KernelName,
  type SweepKernel,
  defaultKernel,
  jsKernel,
  wasmKernel,
} from './kernel/sweepKernel.js'
import { NEWMARK_PARAMETERS, SPECTRUM_METHODS, type SpectrumMethod } from './oscillatorRecurrence.js'
import {
  type PairRecord,
  PAIR_COMBINATION_STATEMENT,
  type PairPeaks,
  pairOrdinates,
  solvePairOscillators,
} from './rotd.js'
import {
  ACCURACY_TARGET,
  MAX_SUB_STEPS,
  NEWMARK_FIRST_PASS_AIM,
  PEAK_PICKING_BOUND,
  PEAK_PICKING_BUDGET,
  PEAK_SAMPLES_PER_PERIOD,
  type PeakReading,
  SOLVER_ERROR_BUDGET,
  chooseSubSteps,
  freeAmplitudeBound,
  peakPickingBound,
  peakReadingBudget,
  refinedSubSteps,
  slopeChanges,
} from './subSteps.js'
import {
  type OscillatorPeaks,
  type OscillatorSpec,
  type StartValues,
  oscillatorPeaks,
  sweepOscillators,
  sweepOscillatorsStaged,
} from './sweepOscillators.js'
import type { SpectrumWarning } from './warnings.js'
import { PEAK_SEARCH_SUMMARY } from './methodSummary.js'

export type { SpectrumMethod } from './oscillatorRecurrence.js'
export type { PairRecord } from './rotd.js'
export { PEAK_SEARCH_SUMMARY } from './methodSummary.js'

/** Version of the numerical engine, stated with every result. */
export const ENGINE_VERSION = 'ordinate-spectra 1.0.0'

export const MAX_DAMPING_RATIO = 0.5
/** Damping up to which the accuracy target is demonstrated. */
export const ACCURACY_DAMPING_LIMIT = 0.3

export interface SpectrumRecord {
  accelMPerS2: Float64Array
  dtS: number
}

/** What a run computes the spectrum of: one record, or the two horizontal components of a pair. */
export type SpectrumSubject = SpectrumRecord | PairRecord

export function isPairSubject(subject: SpectrumSubject): subject is PairRecord {
  return 'accel1MPerS2' in subject
}

export interface SpectrumSettings {
  dampingRatios: number[]
  periodsS: number[]
  method: SpectrumMethod
  /** Pairs only: the combinations to report, in this order for each damping ratio (default all). */
  combinations?: Combination[]
  onProgress?: (fraction: number) => void
  /** Kernel to run; by default WebAssembly SIMD where available, else JavaScript. Both give the same bits. */
  kernel?: KernelName
}

/** One damping ratio's ordinates (and, for a pair, one combination's), in the order of the periods. */
export interface SpectrumCurve {
  dampingRatio: number
  /** How a pair's two components were combined; absent for a record. */
  combination?: Combination
  sdM: Float64Array
  svMPerS: Float64Array
  saMPerS2: Float64Array
  psvMPerS: Float64Array
  psaMPerS2: Float64Array
  /** Records only: time of the SD peak from the first sample; after the record's end when the free vibration peaks higher. */
  sdTimeS?: Float64Array
  saTimeS?: Float64Array
}

/** A record's curves, which always carry the peak times. */
export interface RecordSpectrumCurve extends SpectrumCurve {
  combination?: undefined
  sdTimeS: Float64Array
  saTimeS: Float64Array
}

/** What produced the numbers, for the label of every output. */
export interface MethodStatement {
  method: SpectrumMethod
  solver: string
  newmarkGamma: number | null
  newmarkBeta: number | null
  recordDtS: number
  initialConditions: string
  subStepRule: string
  subStepsMin: number
  subStepsMax: number
  freeVibrationTail: string
  accuracyTarget: string
  kernel: KernelName
  engineVersion: string
  /** Pairs only: how the two components were combined. */
  combinationRule?: string
}

export interface SpectrumComputation<Curve extends SpectrumCurve = SpectrumCurve> {
  periodsS: Float64Array
  /** Damping-major; for a pair, then in the order of the combinations. */
  curves: Curve[]
  methodStatement: MethodStatement
  /** Non-blocking cautions about this computation, as codes and values (shared/warningMessages.ts words them). */
  warnings: SpectrumWarning[]
  /** Oscillator-steps run in all passes (for a pair, both components'; for Newmark, the exact check too), the measure of work. */
  oscillatorSteps: number
}

/**
 * The first pass of a sweep: sub-steps from the rule before any peaks are known.
 * Refinement after the first pass (see subSteps.ts) may add work.
 */
export interface SpectrumPlan {
  /** Sub-steps per oscillator, damping-major: index = d·periods + p. */
  subSteps: Int32Array
  oscillatorSteps: number
  /** Oscillators whose sub-steps hit the cap, with the rule's error estimate at the cap. */
  capped: { periodS: number; dampingRatio: number; errorEstimate: number }[]
  /** The recurrence per oscillator (piecewise-exact where Newmark would need more than the cap; subSteps.ts). */
  recurrences: SpectrumMethod[]
  /** How many oscillators run on the piecewise-exact recurrence in place of Newmark. */
  exactInstead: number
  /** How peaks are read: searched between steps (records) or at step ends (pairs). */
  reading: PeakReading
}

const SOLVER_TEXT: Record<SpectrumMethod, string> = {
  'newmark-average':
    'Newmark-β, average acceleration (γ = 1/2, β = 1/4), unconditionally stable (Newmark 1959)',
  'newmark-linear': 'Newmark-β, linear acceleration (γ = 1/2, β = 1/6), stable for h/T ≤ √3/π (Newmark 1959)',
  'piecewise-exact':
    'Piecewise-exact recurrence, exact at step ends for ground acceleration linear between samples (Nigam & Jennings 1969)',
}

const SEARCH_RULE =
  `Steps where peaks may lie: within a step with the record linear, the exact response is a straight line plus ` +
  `a damped sinusoid of amplitude W, so |u| cannot rise more than (ωh)²/8·W above its larger end value, nor above ` +
  `the line's largest value plus W (likewise v with ωW and the absolute acceleration with ω²W); every step where ` +
  `either bound reaches the running peak is searched, and no other step can hold a larger value.`

/** The full rule for a record's sweep, per method, for the sheet and the JSON method statement. */
function recordSubStepRule(method: SpectrumMethod, exactInstead: number): string {
  if (method === 'piecewise-exact') {
    return (
      `${PEAK_SEARCH_SUMMARY[method]} ${SEARCH_RULE} In a searched step the extremes are the roots of u′ (SD), ` +
      `u″ (SV) and d/dt(2ζωu′ + ω²u) (SA) of the closed-form solution, bracketed on pieces no longer than half a ` +
      `damped period (between them the derivative is monotonic).`
    )
  }
  const instead =
    exactInstead > 0
      ? ` For ${exactInstead} oscillator${exactInstead === 1 ? '' : 's'} that rule would need more than ` +
        `${MAX_SUB_STEPS} sub-steps (low damping, periods near or below 2Δt); ${exactInstead === 1 ? 'it runs' : 'they run'} ` +
        `on the piecewise-exact recurrence (Nigam & Jennings 1969) with its exact peak search instead, no sub-steps.`
      : ''
  return (
    `${PEAK_SEARCH_SUMMARY[method]} Per oscillator, step h = Δt/m on the record interpolated linearly between ` +
    `samples. The first pass takes the smallest m for which ε·(2 + ω·min(D/2, 1/(ζω))) ≤ ` +
    `${100 * NEWMARK_FIRST_PASS_AIM}%, ε being the relative error of the step's eigenvalue (period elongation and ` +
    `decay error) and D the duration, rounded up to 1–8 or 8, 10, 12, 14 times a power of two. ${SEARCH_RULE} In a ` +
    `searched step the peaks are read from cubic Hermite interpolants of (u, u′) for SD, (u′, u″) for SV and ` +
    `(A, A′) for SA, A = 2ζωu′ + ω²u. Each oscillator is also run once on the piecewise-exact recurrence (Nigam & ` +
    `Jennings 1969), one step per sample, with its exact peak search, which gives the peaks of the exact response; ` +
    `while any of the Newmark SD, SV and SA differs from those by more than ${100 * ACCURACY_TARGET}%, the ` +
    `oscillator is run again with m raised as h² (both Newmark variants converge as h²), up to three times and ` +
    `${MAX_SUB_STEPS} sub-steps. The reported ordinates are the Newmark ones.${instead}`
  )
}

/** Peaks read at step ends (pairs). */
const SUB_STEP_RULE =
  `Per oscillator, step h = Δt/m on the record interpolated linearly between samples. ` +
  `m gives at least ${PEAK_SAMPLES_PER_PERIOD} steps per period (a sinusoid's peak between steps is under-read by at ` +
  `most 1 − cos(π/${PEAK_SAMPLES_PER_PERIOD}) = ${(100 * PEAK_PICKING_BOUND).toFixed(2)}%); after a first pass, an ` +
  `oscillator is run again with more sub-steps while a bound on what can lie between steps, from its peaks and a ` +
  `bound on its free-vibration amplitude (from the record's PGA and slopes, or its kinks), exceeds ` +
  `${(100 * PEAK_PICKING_BUDGET).toFixed(2)}%. For Newmark, m also holds ` +
  `ε·(2 + ω·min(D/2, 1/(ζω))) ≤ ${(100 * SOLVER_ERROR_BUDGET).toFixed(2)}%, where ε is the relative error of the step's ` +
  `eigenvalue (the period elongation and decay error) and D the duration. m is rounded up to 1–8 or 8, 10, 12, 14 ` +
  `times a power of two, at most ${MAX_SUB_STEPS}.`

const PAIR_SUB_STEP_RULE =
  `${SUB_STEP_RULE} For a pair, both components take the same m, and the bound is taken relative to each ` +
  `combination reported: for the geometric mean, on each component with its own peaks, PGA, slopes and kinks; for ` +
  `RotD100, on the maximum-direction peaks with the pair's resultant PGA, slopes and kinks; for RotD50, that bound ` +
  `scaled by RotD100/RotD50.`

const TAIL_TEXT =
  'Included: after the last sample the ground is still and the oscillator vibrates freely; the peaks of that ' +
  'free vibration are found in closed form, the same as for an unbounded tail.'

const PAIR_TAIL_TEXT =
  'Included: after the last sample the ground is still; the peaks of the free vibration are found in closed form ' +
  'in every direction.'

const ACCURACY_TEXT =
  `Each ordinate within ${100 * ACCURACY_TARGET}% of the exact response to the record interpolated linearly ` +
  `between samples, for periods 0.01–10 s and damping 0–${100 * ACCURACY_DAMPING_LIMIT}%.`

const PAIR_SOLVER_SUFFIX = ', on each component'

/** Throws a RangeError unless the method, damping ratios and periods are usable. */
export function checkSpectrumSettings(
  settings: Pick<SpectrumSettings, 'dampingRatios' | 'periodsS' | 'method'>,
): void {
  if (!SPECTRUM_METHODS.includes(settings.method))
    throw new RangeError(`unknown method ${String(settings.method)}`)
  if (settings.dampingRatios.length === 0) throw new RangeError('give at least one damping ratio')
  for (const zeta of settings.dampingRatios) {
    if (!(zeta >= 0 && zeta < MAX_DAMPING_RATIO)) throw new RangeError('dampingRatio must be in [0, 0.5)')
  }
  if (settings.periodsS.length === 0) throw new RangeError('give at least one period')
  for (const period of settings.periodsS) {
    if (!(Number.isFinite(period) && period > 0))
      throw new RangeError('periods must be positive numbers of seconds')
  }
}

/** The subject's component series (one for a record, two for a pair). */
function componentsOf(subject: SpectrumSubject): Float64Array[] {
  return isPairSubject(subject) ? [subject.accel1MPerS2, subject.accel2MPerS2] : [subject.accelMPerS2]
}

function checkInputs(subject: SpectrumSubject, settings: SpectrumSettings): void {
  if (!(Number.isFinite(subject.dtS) && subject.dtS > 0))
    throw new RangeError('dtS must be a positive number of seconds')
  const components = componentsOf(subject)
  if (components[0]!.length < 2) throw new RangeError('the record needs at least two samples')
  if (components.some((series) => series.length !== components[0]!.length))
    throw new RangeError('the two components must have the same number of samples')
  for (const series of components) {
    for (const value of series) {
      if (!Number.isFinite(value))
        throw new RangeError('the record holds a value that is not a finite number')
    }
  }
  checkSpectrumSettings(settings)
  if (isPairSubject(subject)) {
    const combinations = settings.combinations ?? COMBINATIONS
    if (combinations.length === 0) throw new RangeError('give at least one combination')
    for (const combination of combinations) {
      if (!COMBINATIONS.includes(combination))
        throw new RangeError(`unknown combination ${String(combination)}`)
    }
  }
}

/** Sub-steps and total work of a sweep, without running it (for estimates and limits). */
export function planSpectrum(
  points: number,
  dtS: number,
  settings: Pick<SpectrumSettings, 'dampingRatios' | 'periodsS' | 'method'>,
  reading: PeakReading = 'between-steps',
): SpectrumPlan {
  const durationS = (points - 1) * dtS
  const periods = settings.periodsS.length
  const subSteps = new Int32Array(settings.dampingRatios.length * periods)
  const capped: SpectrumPlan['capped'] = []
  const recurrences: SpectrumMethod[] = []
  let exactInstead = 0
  let oscillatorSteps = 0
  settings.dampingRatios.forEach((dampingRatio, d) => {
    settings.periodsS.forEach((periodS, p) => {
      const choice = chooseSubSteps(settings.method, periodS, dampingRatio, dtS, durationS, reading)
      subSteps[d * periods + p] = choice.subSteps
      recurrences[d * periods + p] = choice.recurrence
      if (choice.recurrence !== settings.method) exactInstead++
      oscillatorSteps += (points - 1) * choice.subSteps
      if (choice.capped) capped.push({ periodS, dampingRatio, errorEstimate: choice.errorEstimate })
    })
  })
  return { subSteps, oscillatorSteps, capped, recurrences, exactInstead, reading }
}

function pickKernel(name: KernelName | undefined): SweepKernel {
  if (name === 'js') return jsKernel()
  if (name === 'wasm-simd') {
    const kernel = wasmKernel()
    if (!kernel) throw new Error('WebAssembly SIMD is not available in this runtime')
    return kernel
  }
  return defaultKernel()
}

function computationWarnings(
  dtS: number,
  settings: SpectrumSettings,
  plan: SpectrumPlan,
  peakBoundAboveBudget: number,
): SpectrumWarning[] {
  const warnings: SpectrumWarning[] = []
  const twoDtS = 2 * dtS
  const below = settings.periodsS.filter((period) => period < twoDtS).length
  if (below > 0) warnings.push({ code: 'periods-below-two-dt', periods: below, twoDtS })
  if (settings.dampingRatios.some((zeta) => zeta > ACCURACY_DAMPING_LIMIT)) {
    warnings.push({
      code: 'damping-above-accuracy-limit',
      accuracyTarget: ACCURACY_TARGET,
      dampingLimit: ACCURACY_DAMPING_LIMIT,
    })
  }
  if (plan.capped.length > 0) {
    warnings.push({
      code: 'sub-step-cap',
      oscillators: plan.capped.length,
      maxSubSteps: MAX_SUB_STEPS,
      errorEstimate: Math.max(...plan.capped.map((entry) => entry.errorEstimate)),
    })
  }
  if (peakBoundAboveBudget > 0) {
    warnings.push({
      code: 'peak-bound-above-budget',
      oscillators: peakBoundAboveBudget,
      maxSubSteps: MAX_SUB_STEPS,
      budget: peakReadingBudget(plan.reading),
    })
  }
  return warnings
}

/** What the bound on peaks between steps needs to know of a ground motion (one series, or a pair's resultant). */
export interface ForcingBounds {
  /** Peak ground acceleration. */
  pgaMPerS2: number
  /** Steepest slope between samples, max|Δa|/Δt. */
  maxSlopeMPerS3: number
  /** Bound on the free-vibration amplitude of an oscillator, from the motion's kinks (a pass over the record). */
  freeAmplitudeM(periodS: number, dampingRatio: number): number
}

/** An oscillator's peaks as the bound reads them. */
export interface OrdinatePeaks {
  sdM: number
  svMPerS: number
  saMPerS2: number
}

/**
 * The bound on how far an oscillator's peaks, read at step ends, can fall below the continuous
 * peaks, relative to each (subSteps.ts rule 1): from the PGA and steepest slope first, and where
 * that exceeds the budget, with the tighter free-vibration amplitude from the kinks.
 */
export function oscillatorPeakBound(
  oscillator: OscillatorSpec,
  dtS: number,
  peaks: OrdinatePeaks,
  forcing: ForcingBounds,
): number {
  const input = {
    periodS: oscillator.periodS,
    dampingRatio: oscillator.dampingRatio,
    stepS: dtS / oscillator.subSteps,
    ...peaks,
    pgaMPerS2: forcing.pgaMPerS2,
    maxSlopeMPerS3: forcing.maxSlopeMPerS3,
  }
  const bound = peakPickingBound(input)
  if (bound <= peakReadingBudget(oscillator.reading)) return bound
  return peakPickingBound({
    ...input,
    freeAmplitudeM: forcing.freeAmplitudeM(oscillator.periodS, oscillator.dampingRatio),
  })
}

/** A free-vibration amplitude bound per oscillator, computed once and only when asked for. */
function memoised(compute: (periodS: number, dampingRatio: number) => number) {
  const known = new Map<string, number>()
  return (periodS: number, dampingRatio: number) => {
    const key = `${periodS} ${dampingRatio}`
    let value = known.get(key)
    if (value === undefined) {
      value = compute(periodS, dampingRatio)
      known.set(key, value)
    }
    return value
  }
}

/** PGA, steepest slope and kink bound of one series interpolated linearly. */
export function seriesForcing(accelMPerS2: Float64Array, dtS: number): ForcingBounds {
  let pga = 0
  let slope = 0
  for (let i = 0; i < accelMPerS2.length; i++) {
    pga = Math.max(pga, Math.abs(accelMPerS2[i]!))
    if (i > 0) slope = Math.max(slope, Math.abs(accelMPerS2[i]! - accelMPerS2[i - 1]!))
  }
  let changes: Float64Array | undefined
  return {
    pgaMPerS2: pga,
    maxSlopeMPerS3: slope / dtS,
    freeAmplitudeM: memoised((periodS, dampingRatio) => {
      changes ??= slopeChanges(accelMPerS2, dtS)
      return freeAmplitudeBound(accelMPerS2, changes, dtS, periodS, dampingRatio)
    }),
  }
}

/**
 * Bounds that hold for the motion a₁cosθ + a₂sinθ in every direction θ: the largest resultant
 * acceleration and slope, and a kink bound from the resultant kinks √(Δs₁² + Δs₂²) ≥ |Δs(θ)|. The
 * amplitude at rest, linear in the first sample and slope, is at most the root sum of squares of
 * the components' (Cauchy–Schwarz), and R(t) ≤ R₀e^(−ζωt) + kicks ≤ R₀ + the bound of the kicks alone.
 */
export function resultantForcing(pair: PairRecord): ForcingBounds {
  const g1 = pair.accel1MPerS2
  const g2 = pair.accel2MPerS2
  const { dtS } = pair
  let pga = 0
  let slope = 0
  for (let i = 0; i < g1.length; i++) {
    pga = Math.max(pga, Math.hypot(g1[i]!, g2[i]!))
    if (i > 0) slope = Math.max(slope, Math.hypot(g1[i]! - g1[i - 1]!, g2[i]! - g2[i - 1]!))
  }
  let changes: Float64Array | undefined
  const atRest = new Float64Array(2)
  const noKinks = new Float64Array(2)
  return {
    pgaMPerS2: pga,
    maxSlopeMPerS3: slope / dtS,
    freeAmplitudeM: memoised((periodS, dampingRatio) => {
      if (!changes) {
        const c1 = slopeChanges(g1, dtS)
        const c2 = slopeChanges(g2, dtS)
        changes = c1.map((c, i) => Math.hypot(c, c2[i]!))
      }
      const start = (g: Float64Array) =>
        freeAmplitudeBound(g.subarray(0, 2), noKinks, dtS, periodS, dampingRatio)
      return (
        Math.hypot(start(g1), start(g2)) + freeAmplitudeBound(atRest, changes, dtS, periodS, dampingRatio)
      )
    }),
  }
}

/** A subject's oscillators as the refinement driver sees them. */
export interface OscillatorSolver {
  /** Solves the oscillators at these indices with their current sub-steps and keeps their peaks. */
  solve(indices: readonly number[], onProgress?: (fraction: number) => void): void
  /** The bound on peaks between steps of oscillator `index`'s last solve, relative to every ordinate reported. */
  peakBound(index: number): number
  /** Oscillator-steps run so far, every pass and component included. */
  readonly stepsRun: number
}

/** Refinement passes after the first pass. */
const MAX_REFINEMENTS = 3
/** Share of the progress bar given to the first pass; refinement passes fill the rest. */
const FIRST_PASS_SHARE = 0.9

/**
 * The one refinement driver: runs the first pass, then re-runs each oscillator whose bound on
 * peaks between steps exceeds the budget with more sub-steps, up to three times, and checks the
 * result of the last pass too. Each decision uses only that oscillator's own peaks, so results
 * stay independent of the rest of the sweep. Returns how many oscillators end above the budget
 * (at the sub-step cap, or after the last pass).
 */
export function refineSweep(
  oscillators: OscillatorSpec[],
  solver: OscillatorSolver,
  onProgress: ((fraction: number) => void) | undefined,
): number {
  const all = oscillators.map((_, index) => index)
  solver.solve(all, onProgress && ((fraction) => onProgress(FIRST_PASS_SHARE * fraction)))
  let stillAbove = 0
  for (let pass = 0; pass <= MAX_REFINEMENTS; pass++) {
    const again: number[] = []
    stillAbove = 0
    oscillators.forEach((oscillator, index) => {
      const bound = solver.peakBound(index)
      if (bound <= peakReadingBudget(oscillator.reading)) return
      if (pass === MAX_REFINEMENTS || oscillator.subSteps >= MAX_SUB_STEPS) {
        stillAbove++
        return
      }
      oscillator.subSteps = refinedSubSteps(oscillator.subSteps, bound, oscillator.reading)
      again.push(index)
    })
    if (again.length === 0) break
    const from = FIRST_PASS_SHARE + (1 - FIRST_PASS_SHARE) * (pass / MAX_REFINEMENTS)
    const share = (1 - FIRST_PASS_SHARE) / MAX_REFINEMENTS
    solver.solve(again, onProgress && ((fraction) => onProgress(from + share * fraction)))
  }
  return stillAbove
}

/**
 * Largest relative difference of an oscillator's SD, SV and SA from the exact ones: Newmark's
 * whole error against the exact response to the same interpolated record (an ordinate of zero
 * must be matched exactly).
 */
function relativeDifference(
  peaks: OscillatorPeaks,
  exact: OscillatorPeaks,
  index: number,
  slot: number,
): number {
  let worst = 0
  for (const key of ['sdM', 'svMPerS', 'saMPerS2'] as const) {
    const reference = exact[key][slot]!
    const difference = Math.abs(peaks[key][index]! - reference)
    worst = Math.max(worst, reference > 0 ? difference / reference : difference > 0 ? Infinity : 0)
  }
  return worst
}

/**
 * One record through the sweep kernel: the peaks of each oscillator, with their times. For a
 * Newmark method, each oscillator is also run once on the piecewise-exact recurrence with its
 * exact peak search (no sub-steps), and its bound is the measured difference from those peaks
 * (see recordSubStepRule).
 */
function recordSolver(
  record: SpectrumRecord,
  oscillators: OscillatorSpec[],
  method: SpectrumMethod,
  kernel: SweepKernel,
): OscillatorSolver & { peaks: OscillatorPeaks } {
  const count = oscillators.length
  const peaks = oscillatorPeaks(count)
  const intervals = record.accelMPerS2.length - 1
  let exact: ReturnType<typeof exactPeaks> | null = null
  const solvedBefore = new Uint8Array(count)
  const solver = {
    peaks,
    stepsRun: 0,
    solve(indices: readonly number[], onProgress?: (fraction: number) => void) {
      // For a Newmark method the exact check runs first, so that the first Newmark pass can
      // start the kernel's running peaks just below the exact ones; a later pass starts them
      // just below the last pass's. Neither changes a result (see START_BELOW).
      if (!exact && method !== 'piecewise-exact') {
        exact = exactPeaks(record, oscillators, method, kernel, (steps) => (solver.stepsRun += steps))
        solver.stepsRun += intervals * exact.count
      }
      const checked = exact
      const specs = indices.map((index): OscillatorSpec => {
        const oscillator = oscillators[index]!
        if (solvedBefore[index]) return { ...oscillator, start: startBelow(peaks, index) }
        const slot = checked?.slotOf[index] ?? -1
        return slot >= 0 ? { ...oscillator, start: startBelow(checked!.peaks, slot) } : oscillator
      })
      // With nothing earlier to start from (the first pass of the piecewise-exact method), the
      // pass starts from its own first stage (sweepOscillatorsStaged).
      const sweep = specs.some((spec) => spec.start) ? sweepOscillators : sweepOscillatorsStaged
      const solved = sweep(record, specs, method, {
        kernel,
        onProgress,
        onSweptAgain: (steps) => (solver.stepsRun += steps),
      })
      for (const spec of specs) solver.stepsRun += intervals * spec.subSteps
      for (const index of indices) solvedBefore[index] = 1
      indices.forEach((index, slot) => {
        for (const key of ['sdM', 'svMPerS', 'saMPerS2', 'sdTimeS', 'saTimeS'] as const) {
          peaks[key][index] = solved[key][slot]!
        }
      })
    },
    peakBound(index: number) {
      // The exact search leaves nothing between steps unread (subSteps.ts).
      if ((oscillators[index]!.recurrence ?? method) === 'piecewise-exact') return 0
      if (!exact) throw new Error('the exact check runs before the first Newmark pass')
      return relativeDifference(peaks, exact.peaks, index, exact.slotOf[index]!)
    },
  }
  return solver
}

/**
 * Where a pass starts an oscillator's running peaks: a little below peaks it is expected to
 * reach (the exact check's, for the first Newmark pass; the last pass's, for a later one), which
 * it rarely undercuts by more than a few tenths of a percent. Only the kernel's listing of steps
 * depends on it, never a result (sweepOscillators.ts sweeps again from 0 where a peak does not
 * end above its start).
 */
const START_BELOW = 0.9

function startBelow(peaks: OscillatorPeaks, index: number): StartValues {
  return {
    sd: START_BELOW * peaks.sdM[index]!,
    sv: START_BELOW * peaks.svMPerS[index]!,
    sa: START_BELOW * peaks.saMPerS2[index]!,
  }
}

/** The peaks of a sweep's Newmark oscillators on the piecewise-exact recurrence, one step per sample. */
function exactPeaks(
  record: SpectrumRecord,
  oscillators: readonly OscillatorSpec[],
  method: SpectrumMethod,
  kernel: SweepKernel,
  onSweptAgain: (steps: number) => void,
): { peaks: OscillatorPeaks; slotOf: Int32Array; count: number } {
  const slotOf = new Int32Array(oscillators.length).fill(-1)
  const specs: OscillatorSpec[] = []
  oscillators.forEach((oscillator, index) => {
    if ((oscillator.recurrence ?? method) === 'piecewise-exact') return
    slotOf[index] = specs.length
    specs.push({
      periodS: oscillator.periodS,
      dampingRatio: oscillator.dampingRatio,
      subSteps: 1,
      recurrence: 'piecewise-exact',
      reading: 'between-steps',
    })
  })
  return {
    peaks: sweepOscillatorsStaged(record, specs, 'piecewise-exact', { kernel, onSweptAgain }),
    slotOf,
    count: specs.length,
  }
}

/** Largest ratio of the maximum-direction peaks to RotD50's (how much smaller RotD50's ordinates are). */
function rotD50Scale(maximum: OrdinatePeaks, median: OrdinatePeaks): number {
  let scale = 1
  for (const key of ['sdM', 'svMPerS', 'saMPerS2'] as const) {
    if (median[key] > 0) scale = Math.max(scale, maximum[key] / median[key])
  }
  return scale
}

/**
 * A pair's two components through the pair solve (rotd.ts), with the bound on peaks between steps
 * taken relative to each reported combination (see PAIR_SUB_STEP_RULE): the geometric mean is
 * within max(e₁, e₂) when each component's ordinate is within its own eᵢ, and a percentile over the
 * directions is under-read by at most the largest under-read of any direction.
 */
function pairSolver(
  pair: PairRecord,
  oscillators: OscillatorSpec[],
  method: SpectrumMethod,
  kernel: SweepKernel,
  combinations: readonly Combination[],
): OscillatorSolver & { peaks: PairPeaks[] } {
  const peaks: PairPeaks[] = []
  const forcing1 = seriesForcing(pair.accel1MPerS2, pair.dtS)
  const forcing2 = seriesForcing(pair.accel2MPerS2, pair.dtS)
  const resultant = resultantForcing(pair)
  const byComponent = combinations.includes('geomean')
  const byDirection = combinations.includes('rotd50') || combinations.includes('rotd100')
  const median = combinations.includes('rotd50')
  const intervals = pair.accel1MPerS2.length - 1
  const solver = {
    peaks,
    stepsRun: 0,
    solve(indices: readonly number[], onProgress?: (fraction: number) => void) {
      for (const index of indices) solver.stepsRun += 2 * intervals * oscillators[index]!.subSteps
      solvePairOscillators(
        pair,
        indices.map((index) => oscillators[index]!),
        method,
        kernel,
        onProgress,
        (steps) => (solver.stepsRun += steps),
        // A refinement pass starts each oscillator from its own last pass.
        indices.map((index) => peaks[index]?.setters),
      ).forEach((solved, slot) => {
        peaks[indices[slot]!] = solved
      })
    },
    peakBound(index: number) {
      const oscillator = oscillators[index]!
      const solved = peaks[index]!
      let bound = 0
      if (byComponent) {
        const [first, second] = [pairOrdinates(solved, 'first'), pairOrdinates(solved, 'second')]
        bound = Math.max(
          oscillatorPeakBound(oscillator, pair.dtS, first, forcing1),
          oscillatorPeakBound(oscillator, pair.dtS, second, forcing2),
        )
      }
      if (byDirection) {
        const maximum = pairOrdinates(solved, 'rotd100')
        const scale = median ? rotD50Scale(maximum, pairOrdinates(solved, 'rotd50')) : 1
        bound = Math.max(bound, scale * oscillatorPeakBound(oscillator, pair.dtS, maximum, resultant))
      }
      return bound
    },
  }
  return solver
}

/** Each damping ratio's ordinates from its oscillators' peaks (damping-major, index = d·periods + p). */
function curveOf(
  dampingRatio: number,
  periodsS: readonly number[],
  ordinate: (p: number) => OrdinatePeaks,
): Omit<SpectrumCurve, 'combination' | 'sdTimeS' | 'saTimeS'> {
  const n = periodsS.length
  const curve = {
    dampingRatio,
    sdM: new Float64Array(n),
    svMPerS: new Float64Array(n),
    saMPerS2: new Float64Array(n),
    psvMPerS: new Float64Array(n),
    psaMPerS2: new Float64Array(n),
  }
  periodsS.forEach((periodS, p) => {
    const { sdM, svMPerS, saMPerS2 } = ordinate(p)
    const omega = (2 * Math.PI) / periodS
    curve.sdM[p] = sdM
    curve.svMPerS[p] = svMPerS
    curve.saMPerS2[p] = saMPerS2
    curve.psvMPerS[p] = omega * sdM
    curve.psaMPerS2[p] = omega * omega * sdM
  })
  return curve
}

/**
 * The spectrum of a run's subject: a record (curves with peak times), or a pair of horizontal
 * components (one curve per damping ratio and combination, see rotd.ts). Both go through one
 * plan, one refinement driver and one result shape; only the per-oscillator solve differs.
 */
export function computeSpectrum(
  record: SpectrumRecord,
  settings: SpectrumSettings,
): SpectrumComputation<RecordSpectrumCurve>
export function computeSpectrum(subject: SpectrumSubject, settings: SpectrumSettings): SpectrumComputation
export function computeSpectrum(subject: SpectrumSubject, settings: SpectrumSettings): SpectrumComputation {
  checkInputs(subject, settings)
  const { dampingRatios, periodsS, method } = settings
  const components = componentsOf(subject)
  const points = components[0]!.length
  const reading: PeakReading = isPairSubject(subject) ? 'step-ends' : 'between-steps'
  const plan = planSpectrum(points, subject.dtS, settings, reading)
  const oscillators: OscillatorSpec[] = []
  dampingRatios.forEach((dampingRatio, d) => {
    periodsS.forEach((periodS, p) => {
      const index = d * periodsS.length + p
      const recurrence = plan.recurrences[index]!
      oscillators.push({
        periodS,
        dampingRatio,
        subSteps: plan.subSteps[index]!,
        reading,
        recurrence,
      })
    })
  })
  const kernel = pickKernel(settings.kernel)
  const combinations = settings.combinations ?? [...COMBINATIONS]
  settings.onProgress?.(0)
  let curves: SpectrumCurve[]
  let stillAbove: number
  let oscillatorSteps: number
  if (isPairSubject(subject)) {
    const solver = pairSolver(subject, oscillators, method, kernel, combinations)
    stillAbove = refineSweep(oscillators, solver, settings.onProgress)
    oscillatorSteps = solver.stepsRun
    curves = dampingRatios.flatMap((dampingRatio, d) =>
      combinations.map((combination) => ({
        ...curveOf(dampingRatio, periodsS, (p) =>
          pairOrdinates(solver.peaks[d * periodsS.length + p]!, combination),
        ),
        combination,
      })),
    )
  } else {
    const solver = recordSolver(subject, oscillators, method, kernel)
    stillAbove = refineSweep(oscillators, solver, settings.onProgress)
    oscillatorSteps = solver.stepsRun
    const { peaks } = solver
    curves = dampingRatios.map((dampingRatio, d): RecordSpectrumCurve => {
      const from = d * periodsS.length
      const to = from + periodsS.length
      return {
        ...curveOf(dampingRatio, periodsS, (p) => ({
          sdM: peaks.sdM[from + p]!,
          svMPerS: peaks.svMPerS[from + p]!,
          saMPerS2: peaks.saMPerS2[from + p]!,
        })),
        sdTimeS: peaks.sdTimeS.slice(from, to),
        saTimeS: peaks.saTimeS.slice(from, to),
      }
    })
  }
  settings.onProgress?.(1)

  let subStepsMin = Infinity
  let subStepsMax = 0
  for (const { subSteps } of oscillators) {
    subStepsMin = Math.min(subStepsMin, subSteps)
    subStepsMax = Math.max(subStepsMax, subSteps)
  }
  const newmark = method === 'piecewise-exact' ? null : NEWMARK_PARAMETERS[method]
  const pair = isPairSubject(subject)
  return {
    periodsS: Float64Array.from(periodsS),
    curves,
    methodStatement: {
      method,
      solver: pair ? `${SOLVER_TEXT[method]}${PAIR_SOLVER_SUFFIX}` : SOLVER_TEXT[method],
      newmarkGamma: newmark?.gamma ?? null,
      newmarkBeta: newmark?.beta ?? null,
      recordDtS: subject.dtS,
      initialConditions: 'At rest at the first sample.',
      subStepRule: pair ? PAIR_SUB_STEP_RULE : recordSubStepRule(method, plan.exactInstead),
      subStepsMin,
      subStepsMax,
      freeVibrationTail: pair ? PAIR_TAIL_TEXT : TAIL_TEXT,
      accuracyTarget: ACCURACY_TEXT,
      kernel: kernel.name,
      engineVersion: ENGINE_VERSION,
      ...(pair ? { combinationRule: PAIR_COMBINATION_STATEMENT } : {}),
    },
    warnings: computationWarnings(subject.dtS, settings, plan, stillAbove),
    oscillatorSteps,
  }
}
