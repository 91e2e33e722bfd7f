/**
 * Runs a set of oscillators, each with its own sub-step count, through one
 * record and returns their peak responses, including the free vibration after
 * the record ends. Oscillators are grouped by sub-step count (they then share
 * the interpolated forcing) and handed to the kernel in chunks, so progress can
 * be reported during long sweeps. The result for each oscillator depends only
 * on its own period, damping ratio and sub-step count.
 */
import { type CandidateOscillator, kernelCoefficients, raisePeaksBetweenSteps } from './betweenSteps.js'
import {
  CANDIDATE_VALUES,
  COEFFICIENT_ARRAYS,
  OUTPUT_ARRAYS,
  type SweepKernel,
  defaultKernel,
} from './kernel/sweepKernel.js'
import { freeVibrationTailPeaks } from './freeVibration.js'
import { type SpectrumMethod, recurrenceCoefficients } from './oscillatorRecurrence.js'
import type { PeakReading } from './subSteps.js'

export interface OscillatorSpec {
  periodS: number
  dampingRatio: number
  subSteps: number
  /** The recurrence to run, when it is not the sweep's method (subSteps.ts: Newmark beyond the cap). */
  recurrence?: SpectrumMethod
  /** How the sweep reads this oscillator's peaks (default 'step-ends'; see subSteps.ts). */
  reading?: PeakReading
  /**
   * Expected lower bounds on the peaks over the record (from an earlier pass), which spare the
   * kernel from listing steps that cannot reach them. They never change a result: a peak that
   * does not end above its start value is swept again from 0 (see sweepOscillators).
   */
  start?: StartValues
}

/** Values the running peaks of |u|, |v| and |A| start from in the kernel. */
export interface StartValues {
  sd: number
  sv: number
  sa: number
}

/** Peaks per oscillator, in the order the oscillators were given. */
export interface OscillatorPeaks {
  sdM: Float64Array
  svMPerS: Float64Array
  saMPerS2: Float64Array
  sdTimeS: Float64Array
  saTimeS: Float64Array
}

/** Zeroed peaks for `count` oscillators. */
export function oscillatorPeaks(count: number): OscillatorPeaks {
  return {
    sdM: new Float64Array(count),
    svMPerS: new Float64Array(count),
    saMPerS2: new Float64Array(count),
    sdTimeS: new Float64Array(count),
    saTimeS: new Float64Array(count),
  }
}

export interface SweepOptions {
  kernel?: SweepKernel
  onProgress?: (fraction: number) => void
  /** Add the free vibration after the record (default true). */
  freeVibrationTail?: boolean
  /** Told the oscillator-steps of oscillators swept again because a start value proved too high. */
  onSweptAgain?: (oscillatorSteps: number) => void
}

/** Oscillator-steps per kernel call, about 10 ms of work, so progress moves often. */
const STEPS_PER_CHUNK = 3_000_000
const MAX_CHUNK = 256

export function sweepOscillators(
  record: { accelMPerS2: Float64Array; dtS: number },
  oscillators: readonly OscillatorSpec[],
  method: SpectrumMethod,
  options: SweepOptions = {},
): OscillatorPeaks {
  const { accelMPerS2: accel, dtS } = record
  const kernel = options.kernel ?? defaultKernel()
  const withTail = options.freeVibrationTail ?? true
  const intervals = accel.length - 1
  const durationS = intervals * dtS
  const count = oscillators.length
  const peaks = oscillatorPeaks(count)
  const recurrenceOf = (index: number) => oscillators[index]!.recurrence ?? method
  const order = Array.from({ length: count }, (_, i) => i).sort(
    (a, b) =>
      oscillators[a]!.subSteps - oscillators[b]!.subSteps ||
      recurrenceOf(a).localeCompare(recurrenceOf(b)) ||
      a - b,
  )
  let pga = 0
  let slope = 0
  for (let i = 0; i < accel.length; i++) {
    pga = Math.max(pga, Math.abs(accel[i]!))
    if (i > 0) slope = Math.max(slope, Math.abs(accel[i]! - accel[i - 1]!))
  }
  const bounds = { pgaMPerS2: pga, maxSlopeMPerS3: slope / dtS }
  let totalSteps = 0
  for (const oscillator of oscillators) totalSteps += intervals * oscillator.subSteps
  let doneSteps = 0
  /** Oscillators whose start values proved too high: swept again from 0 at the end. */
  const sweepAgain: number[] = []

  kernel.loadRecord(accel)
  const { lanes, width } = kernel
  const coeffs = new Float64Array(COEFFICIENT_ARRAYS * MAX_CHUNK)
  const out = new Float64Array(OUTPUT_ARRAYS * MAX_CHUNK)
  const candidates = { values: new Float64Array(CANDIDATE_VALUES * 4096), capacity: 4096 }
  let next = 0
  while (next < count) {
    const subSteps = oscillators[order[next]!]!.subSteps
    const recurrence = recurrenceOf(order[next]!)
    let groupEnd = next
    while (
      groupEnd < count &&
      oscillators[order[groupEnd]!]!.subSteps === subSteps &&
      recurrenceOf(order[groupEnd]!) === recurrence
    )
      groupEnd++
    const stepsEach = Math.max(1, intervals * subSteps)
    const chunkSize = Math.min(
      MAX_CHUNK,
      Math.max(width, Math.floor(STEPS_PER_CHUNK / stepsEach / width) * width),
    )
    for (let chunkStart = next; chunkStart < groupEnd; chunkStart += chunkSize) {
      const members = order.slice(chunkStart, Math.min(groupEnd, chunkStart + chunkSize))
      const padded = Math.ceil(members.length / lanes) * lanes
      const stepS = dtS / subSteps
      const solved: CandidateOscillator[] = []
      for (let slot = 0; slot < padded; slot++) {
        const oscillator = oscillators[members[Math.min(slot, members.length - 1)]!]!
        const omega = (2 * Math.PI) / oscillator.periodS
        const c = recurrenceCoefficients(recurrence, omega, oscillator.dampingRatio, stepS)
        const values = kernelCoefficients(c, omega, oscillator.dampingRatio, stepS, bounds)
        values.push(oscillator.start?.sd ?? 0, oscillator.start?.sv ?? 0, oscillator.start?.sa ?? 0)
        for (let q = 0; q < COEFFICIENT_ARRAYS; q++) coeffs[q * padded + slot] = values[q]!
        solved.push({ method: recurrence, coefficients: c, omega, zeta: oscillator.dampingRatio })
      }
      // A nested sweep (from onProgress) may have loaded another record meanwhile.
      if (kernel.loadedRecord !== accel) kernel.loadRecord(accel)
      // The kernels enlarge the buffer as they go, so every candidate step is listed in one sweep.
      const found = kernel.sweep(padded, subSteps, stepS, coeffs, out, candidates)
      const chunkPeaks = members.map((_, slot) => ({
        sd: out[slot]!,
        sdTimeS: out[3 * padded + slot]! * stepS,
        sv: out[padded + slot]!,
        sa: out[2 * padded + slot]!,
        saTimeS: out[4 * padded + slot]! * stepS,
      }))
      raisePeaksBetweenSteps(
        accel,
        subSteps,
        stepS,
        candidates.values,
        found,
        solved,
        chunkPeaks.map((chunkPeak, slot) =>
          oscillators[members[slot]!]!.reading === 'between-steps' ? chunkPeak : null,
        ),
      )
      members.forEach((index, slot) => {
        const oscillator = oscillators[index]!
        const start = oscillator.start
        // Steps left out for a start value were below it; it was a lower bound on the peak (so
        // they cannot hold one) only if the peak over the record ends above it.
        if (
          start &&
          !(
            startHeld(chunkPeaks[slot]!.sd, start.sd) &&
            startHeld(chunkPeaks[slot]!.sv, start.sv) &&
            startHeld(chunkPeaks[slot]!.sa, start.sa)
          )
        ) {
          sweepAgain.push(index)
          return
        }
        let { sd, sdTimeS: sdTime, sv, sa, saTimeS: saTime } = chunkPeaks[slot]!
        if (withTail) {
          const omega = (2 * Math.PI) / oscillator.periodS
          const tail = freeVibrationTailPeaks(
            out[5 * padded + slot]!,
            out[6 * padded + slot]!,
            omega,
            oscillator.dampingRatio,
          )
          if (tail.u.value > sd) {
            sd = tail.u.value
            sdTime = durationS + tail.u.timeS
          }
          if (tail.v.value > sv) sv = tail.v.value
          if (tail.a.value > sa) {
            sa = tail.a.value
            saTime = durationS + tail.a.timeS
          }
        }
        peaks.sdM[index] = sd
        peaks.svMPerS[index] = sv
        peaks.saMPerS2[index] = sa
        peaks.sdTimeS[index] = sdTime
        peaks.saTimeS[index] = saTime
      })
      doneSteps += members.length * intervals * subSteps
      options.onProgress?.(totalSteps > 0 ? doneSteps / totalSteps : 1)
    }
    next = groupEnd
  }
  if (sweepAgain.length > 0) {
    const again = sweepAgain.map((index) => ({ ...oscillators[index]!, start: undefined }))
    const swept = sweepOscillators(record, again, method, { ...options, onProgress: undefined })
    sweepAgain.forEach((index, slot) => {
      for (const key of ['sdM', 'svMPerS', 'saMPerS2', 'sdTimeS', 'saTimeS'] as const)
        peaks[key][index] = swept[key][slot]!
    })
    let steps = 0
    for (const oscillator of again) steps += intervals * oscillator.subSteps
    options.onSweptAgain?.(steps)
  }
  return peaks
}

/** Whether a peak ended strictly above the value its running maximum started from (or that was 0). */
function startHeld(peak: number, start: number): boolean {
  return start === 0 || peak > start
}

/** Every STAGE_STRIDE-th oscillator of a damping ratio, in period order, is swept first, from 0. */
const STAGE_STRIDE = 8
/** The rest start at this share of the smaller of their nearest swept neighbours' peaks... */
const NEIGHBOUR_SHARE = 0.5
/** ...when those neighbours' periods lie within this ratio of theirs (else from 0). */
export const NEIGHBOUR_PERIOD_RATIO = 1.5

/**
 * The oscillators' indices by damping ratio (in the order first met), each list in period order
 * (then index): the order in which staged and chained passes start oscillators from neighbours.
 */
export function periodChains(
  oscillators: readonly Pick<OscillatorSpec, 'periodS' | 'dampingRatio'>[],
): number[][] {
  const byDamping = new Map<number, number[]>()
  oscillators.forEach((oscillator, index) => {
    const chain = byDamping.get(oscillator.dampingRatio) ?? []
    chain.push(index)
    byDamping.set(oscillator.dampingRatio, chain)
  })
  const chains = [...byDamping.values()]
  for (const chain of chains) chain.sort((a, b) => oscillators[a]!.periodS - oscillators[b]!.periodS || a - b)
  return chains
}

/**
 * sweepOscillators in two stages, for a pass with nothing earlier to start its running peaks
 * from: every STAGE_STRIDE-th oscillator of each damping ratio (in period order) first, from 0;
 * then the rest, each started at NEIGHBOUR_SHARE of the smaller peak of its nearest neighbours in
 * period from the first stage (the spectrum seldom falls by half between them), where those lie
 * within NEIGHBOUR_PERIOD_RATIO of its period. Start values
 * only thin out the listed steps and never change a result (see OscillatorSpec.start), so the
 * peaks are those of sweepOscillators, bit for bit.
 */
export function sweepOscillatorsStaged(
  record: { accelMPerS2: Float64Array; dtS: number },
  oscillators: readonly OscillatorSpec[],
  method: SpectrumMethod,
  options: SweepOptions = {},
): OscillatorPeaks {
  const count = oscillators.length
  const first: number[] = []
  const rest: number[] = []
  const neighbours = new Map<number, [number, number]>()
  for (const list of periodChains(oscillators)) {
    const chosen = list.filter((_, at) => at % STAGE_STRIDE === 0 || at === list.length - 1)
    first.push(...chosen)
    list.forEach((index, at) => {
      if (at % STAGE_STRIDE === 0 || at === list.length - 1) return
      const below = list[at - (at % STAGE_STRIDE)]!
      const above = list[Math.min(list.length - 1, at - (at % STAGE_STRIDE) + STAGE_STRIDE)]!
      rest.push(index)
      const periodS = oscillators[index]!.periodS
      const near =
        periodS / oscillators[below]!.periodS <= NEIGHBOUR_PERIOD_RATIO &&
        oscillators[above]!.periodS / periodS <= NEIGHBOUR_PERIOD_RATIO
      if (near) neighbours.set(index, [below, above])
    })
  }
  if (rest.length === 0 || first.length === 0) return sweepOscillators(record, oscillators, method, options)
  let firstSteps = 0
  let totalSteps = 0
  for (const index of first) firstSteps += oscillators[index]!.subSteps
  for (const oscillator of oscillators) totalSteps += oscillator.subSteps
  const share = firstSteps / totalSteps
  const progress = options.onProgress
  const early = sweepOscillators(
    record,
    first.map((index) => oscillators[index]!),
    method,
    { ...options, onProgress: progress && ((fraction) => progress(share * fraction)) },
  )
  const peaks = oscillatorPeaks(count)
  const keys = ['sdM', 'svMPerS', 'saMPerS2', 'sdTimeS', 'saTimeS'] as const
  const slotOf = new Map<number, number>()
  first.forEach((index, slot) => {
    slotOf.set(index, slot)
    for (const key of keys) peaks[key][index] = early[key][slot]!
  })
  const lower = (key: 'sdM' | 'svMPerS' | 'saMPerS2', [a, b]: [number, number]) =>
    NEIGHBOUR_SHARE * Math.min(early[key][slotOf.get(a)!]!, early[key][slotOf.get(b)!]!)
  const late = sweepOscillators(
    record,
    rest.map((index) => {
      const pair = neighbours.get(index)
      if (!pair) return oscillators[index]!
      const start = { sd: lower('sdM', pair), sv: lower('svMPerS', pair), sa: lower('saMPerS2', pair) }
      return { ...oscillators[index]!, start }
    }),
    method,
    { ...options, onProgress: progress && ((fraction) => progress(share + (1 - share) * fraction)) },
  )
  rest.forEach((index, slot) => {
    for (const key of keys) peaks[key][index] = late[key][slot]!
  })
  return peaks
}
