/**
 * Runs a set of oscillators, each with its own sub-step count, through one
 * record and returns their peak responses, including the free vibration after
 * the record ends. Oscillators are grouped by sub-step count (they then share
 * the interpolated forcing) and handed to the kernel in chunks, so progress can
 * be reported during long sweeps. The result for each oscillator depends only
 * on its own period, damping ratio and sub-step count.
 */
import { COEFFICIENT_ARRAYS, OUTPUT_ARRAYS, type SweepKernel, defaultKernel } from './kernel/sweepKernel.js'
import { freeVibrationTailPeaks } from './freeVibration.js'
import { type SpectrumMethod, recurrenceCoefficients } from './oscillatorRecurrence.js'

export interface OscillatorSpec {
  periodS: number
  dampingRatio: number
  subSteps: number
}

/** Peaks per oscillator, in the order the oscillators were given. */
export interface OscillatorPeaks {
  sdM: Float64Array
  svMPerS: Float64Array
  saMPerS2: Float64Array
  sdTimeS: Float64Array
  saTimeS: Float64Array
}

export interface SweepOptions {
  kernel?: SweepKernel
  onProgress?: (fraction: number) => void
  /** Add the free vibration after the record (default true). */
  freeVibrationTail?: boolean
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
  const peaks: OscillatorPeaks = {
    sdM: new Float64Array(count),
    svMPerS: new Float64Array(count),
    saMPerS2: new Float64Array(count),
    sdTimeS: new Float64Array(count),
    saTimeS: new Float64Array(count),
  }
  const order = Array.from({ length: count }, (_, i) => i).sort(
    (a, b) => oscillators[a]!.subSteps - oscillators[b]!.subSteps || a - b,
  )
  let totalSteps = 0
  for (const oscillator of oscillators) totalSteps += intervals * oscillator.subSteps
  let doneSteps = 0

  kernel.loadRecord(accel)
  const { lanes, width } = kernel
  const coeffs = new Float64Array(COEFFICIENT_ARRAYS * MAX_CHUNK)
  const out = new Float64Array(OUTPUT_ARRAYS * MAX_CHUNK)
  let next = 0
  while (next < count) {
    const subSteps = oscillators[order[next]!]!.subSteps
    let groupEnd = next
    while (groupEnd < count && oscillators[order[groupEnd]!]!.subSteps === subSteps) groupEnd++
    const stepsEach = Math.max(1, intervals * subSteps)
    const chunkSize = Math.min(
      MAX_CHUNK,
      Math.max(width, Math.floor(STEPS_PER_CHUNK / stepsEach / width) * width),
    )
    for (let chunkStart = next; chunkStart < groupEnd; chunkStart += chunkSize) {
      const members = order.slice(chunkStart, Math.min(groupEnd, chunkStart + chunkSize))
      const padded = Math.ceil(members.length / lanes) * lanes
      for (let slot = 0; slot < padded; slot++) {
        const oscillator = oscillators[members[Math.min(slot, members.length - 1)]!]!
        const omega = (2 * Math.PI) / oscillator.periodS
        const c = recurrenceCoefficients(method, omega, oscillator.dampingRatio, dtS / subSteps)
        const values = [
          c.a11,
          c.a12,
          c.b1,
          c.c1,
          c.a21,
          c.a22,
          c.b2,
          c.c2,
          2 * oscillator.dampingRatio * omega,
          omega * omega,
        ]
        for (let q = 0; q < COEFFICIENT_ARRAYS; q++) coeffs[q * padded + slot] = values[q]!
      }
      // A nested sweep (from onProgress) may have loaded another record meanwhile.
      if (kernel.loadedRecord !== accel) kernel.loadRecord(accel)
      kernel.sweep(padded, subSteps, coeffs, out)
      const stepS = dtS / subSteps
      members.forEach((index, slot) => {
        const oscillator = oscillators[index]!
        let sd = out[slot]!
        let sdTime = out[3 * padded + slot]! * stepS
        let sv = out[padded + slot]!
        let sa = out[2 * padded + slot]!
        let saTime = out[4 * padded + slot]! * stepS
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
  return peaks
}
