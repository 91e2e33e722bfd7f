/**
 * Elastic response spectra of a ground-acceleration record: for each damping
 * ratio ζ and period T, the peaks of the unit-mass oscillator
 *   u'' + 2ζω u' + ω² u = −a_g(t),  ω = 2π/T,  at rest at the first sample,
 * with a_g interpolated linearly between samples and the ground still after
 * the last one:
 *   SD = max|u|, SV = max|u'| (relative), SA = max|u'' + a_g| = max|2ζωu' + ω²u|,
 *   PSV = ω·SD, PSA = ω²·SD.
 * Sub-steps are chosen per oscillator (see subSteps.ts) so that each ordinate
 * is within 0.5% of the exact response for T in 0.01–10 s and ζ in 0–30%.
 * Deterministic: the same input gives the same bits, with either kernel.
 */
import { type KernelName, defaultKernel, jsKernel, wasmKernel } from './kernel/sweepKernel.js'
import { NEWMARK_PARAMETERS, SPECTRUM_METHODS, type SpectrumMethod } from './oscillatorRecurrence.js'
import {
  ACCURACY_TARGET,
  MAX_SUB_STEPS,
  PEAK_PICKING_BOUND,
  PEAK_PICKING_BUDGET,
  PEAK_SAMPLES_PER_PERIOD,
  SOLVER_ERROR_BUDGET,
  chooseSubSteps,
  freeAmplitudeBound,
  peakPickingBound,
  refinedSubSteps,
  slopeChanges,
} from './subSteps.js'
import { type OscillatorPeaks, type OscillatorSpec, sweepOscillators } from './sweepOscillators.js'

export type { SpectrumMethod } from './oscillatorRecurrence.js'

/** Version of the numerical engine, stated with every result. */
export const ENGINE_VERSION = 'ordinate-spectra 1.0.0'

export const MAX_DAMPING_RATIO = 0.5
/** Damping up to which the accuracy target is demonstrated. */
export const ACCURACY_DAMPING_LIMIT = 0.3

export interface SpectrumRecord {
  accelMPerS2: Float64Array
  dtS: number
}

export interface SpectrumSettings {
  dampingRatios: number[]
  periodsS: number[]
  method: SpectrumMethod
  onProgress?: (fraction: number) => void
  /** Kernel to run; by default WebAssembly SIMD where available, else JavaScript. Both give the same bits. */
  kernel?: KernelName
}

export interface SpectrumCurve {
  dampingRatio: number
  sdM: Float64Array
  svMPerS: Float64Array
  saMPerS2: Float64Array
  psvMPerS: Float64Array
  psaMPerS2: Float64Array
  /** Time of the SD peak from the first sample; after the record's end when the free vibration peaks higher. */
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
}

export interface SpectrumComputation {
  periodsS: Float64Array
  curves: SpectrumCurve[]
  methodStatement: MethodStatement
  /** Non-blocking cautions about this computation. */
  warnings: string[]
  /** Oscillator-steps run, the measure of work. */
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
}

const SOLVER_TEXT: Record<SpectrumMethod, string> = {
  'newmark-average':
    'Newmark-β, average acceleration (γ = 1/2, β = 1/4), unconditionally stable (Newmark 1959)',
  'newmark-linear': 'Newmark-β, linear acceleration (γ = 1/2, β = 1/6), stable for h/T ≤ √3/π (Newmark 1959)',
  'piecewise-exact':
    'Piecewise-exact recurrence, exact at step ends for ground acceleration linear between samples (Nigam & Jennings 1969)',
}

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

const TAIL_TEXT =
  'Included: after the last sample the ground is still and the oscillator vibrates freely; the peaks of that ' +
  'free vibration are found in closed form, the same as for an unbounded tail.'

const ACCURACY_TEXT =
  `Each ordinate within ${100 * ACCURACY_TARGET}% of the exact response to the record interpolated linearly ` +
  `between samples, for periods 0.01–10 s and damping 0–${100 * ACCURACY_DAMPING_LIMIT}%.`

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

function checkInputs(record: SpectrumRecord, settings: SpectrumSettings): void {
  const { accelMPerS2, dtS } = record
  if (!(Number.isFinite(dtS) && dtS > 0)) throw new RangeError('dtS must be a positive number of seconds')
  if (accelMPerS2.length < 2) throw new RangeError('the record needs at least two samples')
  for (const value of accelMPerS2) {
    if (!Number.isFinite(value)) throw new RangeError('the record holds a value that is not a finite number')
  }
  checkSpectrumSettings(settings)
}

/** Sub-steps and total work of a sweep, without running it (for estimates and limits). */
export function planSpectrum(
  points: number,
  dtS: number,
  settings: Pick<SpectrumSettings, 'dampingRatios' | 'periodsS' | 'method'>,
): SpectrumPlan {
  const durationS = (points - 1) * dtS
  const periods = settings.periodsS.length
  const subSteps = new Int32Array(settings.dampingRatios.length * periods)
  const capped: SpectrumPlan['capped'] = []
  let oscillatorSteps = 0
  settings.dampingRatios.forEach((dampingRatio, d) => {
    settings.periodsS.forEach((periodS, p) => {
      const choice = chooseSubSteps(settings.method, periodS, dampingRatio, dtS, durationS)
      subSteps[d * periods + p] = choice.subSteps
      oscillatorSteps += (points - 1) * choice.subSteps
      if (choice.capped) capped.push({ periodS, dampingRatio, errorEstimate: choice.errorEstimate })
    })
  })
  return { subSteps, oscillatorSteps, capped }
}

function pickKernel(name: KernelName | undefined) {
  if (name === 'js') return jsKernel()
  if (name === 'wasm-simd') {
    const kernel = wasmKernel()
    if (!kernel) throw new Error('WebAssembly SIMD is not available in this runtime')
    return kernel
  }
  return defaultKernel()
}

function computationWarnings(
  record: SpectrumRecord,
  settings: SpectrumSettings,
  plan: SpectrumPlan,
  peakBoundAboveBudget: number,
): string[] {
  const warnings: string[] = []
  const nyquistPeriodS = 2 * record.dtS
  const below = settings.periodsS.filter((period) => period < nyquistPeriodS).length
  if (below > 0) {
    warnings.push(
      `${below} period${below === 1 ? ' is' : 's are'} shorter than 2Δt = ${nyquistPeriodS} s, the shortest the record resolves; ordinates there follow the straight lines between samples.`,
    )
  }
  if (settings.dampingRatios.some((zeta) => zeta > ACCURACY_DAMPING_LIMIT)) {
    warnings.push(
      `The ${100 * ACCURACY_TARGET}% accuracy target is demonstrated for damping up to ${100 * ACCURACY_DAMPING_LIMIT}%.`,
    )
  }
  if (plan.capped.length > 0) {
    const worst = Math.max(...plan.capped.map((entry) => entry.errorEstimate))
    warnings.push(
      `For ${plan.capped.length} oscillator${plan.capped.length === 1 ? '' : 's'} the cap of ${MAX_SUB_STEPS} sub-steps stopped short of the accuracy rule (error estimate up to ${(100 * worst).toPrecision(2)}%). The piecewise-exact method needs no extra sub-steps for accuracy.`,
    )
  }
  if (peakBoundAboveBudget > 0) {
    warnings.push(
      `For ${peakBoundAboveBudget} oscillator${peakBoundAboveBudget === 1 ? '' : 's'} the cap of ${MAX_SUB_STEPS} sub-steps left the bound on peaks between steps above ${(100 * PEAK_PICKING_BUDGET).toFixed(2)}%.`,
    )
  }
  return warnings
}

/** PGA and the steepest slope max|Δa|/Δt of the record interpolated linearly. */
function recordExtremes(record: SpectrumRecord): { pgaMPerS2: number; maxSlopeMPerS3: number } {
  const a = record.accelMPerS2
  let pga = 0
  let slope = 0
  for (let i = 0; i < a.length; i++) {
    pga = Math.max(pga, Math.abs(a[i]!))
    if (i > 0) slope = Math.max(slope, Math.abs(a[i]! - a[i - 1]!))
  }
  return { pgaMPerS2: pga, maxSlopeMPerS3: slope / record.dtS }
}

const MAX_REFINEMENTS = 3
/** Share of the progress bar given to the first pass; refinement passes fill the rest. */
const FIRST_PASS_SHARE = 0.9

/**
 * Runs the first pass, then re-runs each oscillator whose peak-picking bound
 * exceeds the budget with more sub-steps, up to three times. Each decision
 * uses only that oscillator's own peaks, so results stay independent of the
 * rest of the sweep.
 */
function sweepWithRefinement(
  record: SpectrumRecord,
  oscillators: OscillatorSpec[],
  method: SpectrumMethod,
  kernel: ReturnType<typeof pickKernel>,
  onProgress: ((fraction: number) => void) | undefined,
): { peaks: OscillatorPeaks; stillAbove: number } {
  const peaks = sweepOscillators(record, oscillators, method, {
    kernel,
    onProgress: onProgress && ((fraction) => onProgress(FIRST_PASS_SHARE * fraction)),
  })
  const extremes = recordExtremes(record)
  let changes: Float64Array | undefined
  const freeAmplitudes = new Map<number, number>()
  /** The kink bound costs a pass over the record, so it is found only where the first bound fails. */
  const freeAmplitude = (index: number) => {
    let amplitude = freeAmplitudes.get(index)
    if (amplitude === undefined) {
      changes ??= slopeChanges(record.accelMPerS2, record.dtS)
      const { periodS, dampingRatio } = oscillators[index]!
      amplitude = freeAmplitudeBound(record.accelMPerS2, changes, record.dtS, periodS, dampingRatio)
      freeAmplitudes.set(index, amplitude)
    }
    return amplitude
  }
  let stillAbove = 0
  for (let pass = 0; pass < MAX_REFINEMENTS; pass++) {
    const again: number[] = []
    stillAbove = 0
    oscillators.forEach((oscillator, index) => {
      const input = {
        periodS: oscillator.periodS,
        dampingRatio: oscillator.dampingRatio,
        stepS: record.dtS / oscillator.subSteps,
        sdM: peaks.sdM[index]!,
        svMPerS: peaks.svMPerS[index]!,
        saMPerS2: peaks.saMPerS2[index]!,
        ...extremes,
      }
      let bound = peakPickingBound(input)
      if (bound > PEAK_PICKING_BUDGET)
        bound = peakPickingBound({ ...input, freeAmplitudeM: freeAmplitude(index) })
      if (bound <= PEAK_PICKING_BUDGET) return
      if (oscillator.subSteps >= MAX_SUB_STEPS) {
        stillAbove++
        return
      }
      oscillator.subSteps = refinedSubSteps(oscillator.subSteps, bound)
      again.push(index)
    })
    if (again.length === 0) break
    const from = FIRST_PASS_SHARE + (1 - FIRST_PASS_SHARE) * (pass / MAX_REFINEMENTS)
    const share = (1 - FIRST_PASS_SHARE) / MAX_REFINEMENTS
    const refined = sweepOscillators(
      record,
      again.map((index) => oscillators[index]!),
      method,
      { kernel, onProgress: onProgress && ((fraction) => onProgress(from + share * fraction)) },
    )
    again.forEach((index, slot) => {
      for (const key of ['sdM', 'svMPerS', 'saMPerS2', 'sdTimeS', 'saTimeS'] as const) {
        peaks[key][index] = refined[key][slot]!
      }
    })
  }
  return { peaks, stillAbove }
}

export function computeSpectrum(record: SpectrumRecord, settings: SpectrumSettings): SpectrumComputation {
  checkInputs(record, settings)
  const { dampingRatios, periodsS, method } = settings
  const points = record.accelMPerS2.length
  const plan = planSpectrum(points, record.dtS, settings)
  const oscillators: OscillatorSpec[] = []
  dampingRatios.forEach((dampingRatio, d) => {
    periodsS.forEach((periodS, p) => {
      oscillators.push({ periodS, dampingRatio, subSteps: plan.subSteps[d * periodsS.length + p]! })
    })
  })
  const kernel = pickKernel(settings.kernel)
  settings.onProgress?.(0)
  const { peaks, stillAbove } = sweepWithRefinement(record, oscillators, method, kernel, settings.onProgress)
  settings.onProgress?.(1)

  const curves = dampingRatios.map((dampingRatio, d): SpectrumCurve => {
    const from = d * periodsS.length
    const to = from + periodsS.length
    const sdM = peaks.sdM.slice(from, to)
    const psvMPerS = new Float64Array(periodsS.length)
    const psaMPerS2 = new Float64Array(periodsS.length)
    periodsS.forEach((periodS, p) => {
      const omega = (2 * Math.PI) / periodS
      psvMPerS[p] = omega * sdM[p]!
      psaMPerS2[p] = omega * omega * sdM[p]!
    })
    return {
      dampingRatio,
      sdM,
      svMPerS: peaks.svMPerS.slice(from, to),
      saMPerS2: peaks.saMPerS2.slice(from, to),
      psvMPerS,
      psaMPerS2,
      sdTimeS: peaks.sdTimeS.slice(from, to),
      saTimeS: peaks.saTimeS.slice(from, to),
    }
  })

  let subStepsMin = Infinity
  let subStepsMax = 0
  let oscillatorSteps = 0
  for (const { subSteps } of oscillators) {
    subStepsMin = Math.min(subStepsMin, subSteps)
    subStepsMax = Math.max(subStepsMax, subSteps)
    oscillatorSteps += (points - 1) * subSteps
  }
  const newmark = method === 'piecewise-exact' ? null : NEWMARK_PARAMETERS[method]
  return {
    periodsS: Float64Array.from(periodsS),
    curves,
    methodStatement: {
      method,
      solver: SOLVER_TEXT[method],
      newmarkGamma: newmark?.gamma ?? null,
      newmarkBeta: newmark?.beta ?? null,
      recordDtS: record.dtS,
      initialConditions: 'At rest at the first sample.',
      subStepRule: SUB_STEP_RULE,
      subStepsMin,
      subStepsMax,
      freeVibrationTail: TAIL_TEXT,
      accuracyTarget: ACCURACY_TEXT,
      kernel: kernel.name,
      engineVersion: ENGINE_VERSION,
    },
    warnings: computationWarnings(record, settings, plan, stillAbove),
    oscillatorSteps,
  }
}
