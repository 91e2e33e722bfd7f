import { describe, expect, it } from 'vitest'
import { computeSpectrum, planSpectrum } from './computeSpectrum.js'
import { mulberry32 } from './demo/demoRecords.js'
import { SPECTRUM_METHODS } from './oscillatorRecurrence.js'
import { logPeriodGrid } from './periods.js'
import { sweepOscillators } from './sweepOscillators.js'

/** The part of odex's Solver used here (odex 2.0.4). */
interface OdexSolver {
  denseOutput: boolean
  relativeTolerance: number
  absoluteTolerance: number[]
  maxSteps: number
  solve(
    f: (x: number, y: number[]) => number[],
    x0: number,
    y0: number[],
    x1: number,
    output: (
      n: number,
      xOld: number,
      x: number,
      y: number[],
      interpolate?: (i: number, x: number) => number,
    ) => void,
  ): { y: number[] }
}
// odex ships its TypeScript source as its typings, which do not compile under this project's strict
// settings; importing by a non-literal name keeps the type checker out of it.
const odexPackage: string = 'odex'
const { Solver } = (await import(odexPackage)) as { Solver: new (dimension: number) => OdexSolver }

/** The engine's accuracy target: every ordinate within 0.5% of the exact response. */
const TARGET = 0.005

/**
 * White noise under a sine envelope, starting and ending at zero: the harshest case for
 * peaks between samples, since every sample turns the forcing sharply.
 */
function randomRecord(seed: number, points: number): Float64Array {
  const random = mulberry32(seed)
  return Float64Array.from(
    { length: points },
    (_, i) => 4 * (random() - 0.5) * Math.sin((Math.PI * i) / (points - 1)),
  )
}

interface Peaks {
  sd: number
  sv: number
  sa: number
}

/**
 * The exact response to the record interpolated linearly, by an independent
 * general-purpose integrator: ODEX (Hairer & Wanner's Gragg–Bulirsch–Stoer
 * extrapolation, npm `odex`) at relative tolerance 1e-12, restarted at every
 * sample so each segment has smooth (linear) forcing, then the free vibration
 * after the record for three quarters of a damped period. Peaks are read from
 * the dense output at ≥ 600 points per period and ≥ 16 per sample interval (the
 * forcing turns at every sample, which can make v and the absolute acceleration
 * peak sharply between samples).
 */
function odexPeaks(accel: Float64Array, dtS: number, periodS: number, zeta: number): Peaks {
  const omega = (2 * Math.PI) / periodS
  const k = omega * omega
  const c = 2 * zeta * omega
  const pga = Math.max(...accel.map(Math.abs))
  const solver = new Solver(2)
  solver.denseOutput = true
  solver.relativeTolerance = 1e-12
  solver.absoluteTolerance = [1e-14 * (pga / k), 1e-14 * (pga / omega)]
  solver.maxSteps = 100_000
  let state = [0, 0]
  const peaks: Peaks = { sd: 0, sv: 0, sa: 0 }
  const segment = (t0: number, t1: number, a0: number, a1: number, samples: number) => {
    const slope = (a1 - a0) / (t1 - t0)
    const f = (t: number, y: number[]) => [y[1]!, -(a0 + slope * (t - t0)) - c * y[1]! - k * y[0]!]
    const h = (t1 - t0) / samples
    let next = 1
    const result = solver.solve(f, t0, state, t1, (n, _xOld, x, _y, interpolate) => {
      if (n === 1 || !interpolate) return
      while (next <= samples && t0 + next * h <= x * (1 + 1e-14)) {
        const t = Math.min(t0 + next * h, x)
        const u = interpolate(0, t)
        const v = interpolate(1, t)
        peaks.sd = Math.max(peaks.sd, Math.abs(u))
        peaks.sv = Math.max(peaks.sv, Math.abs(v))
        peaks.sa = Math.max(peaks.sa, Math.abs(c * v + k * u))
        next++
      }
    })
    state = result.y
  }
  const perSample = Math.max(16, Math.ceil((600 * dtS) / periodS))
  for (let i = 0; i + 1 < accel.length; i++)
    segment(i * dtS, (i + 1) * dtS, accel[i]!, accel[i + 1]!, perSample)
  const endS = (accel.length - 1) * dtS
  segment(endS, endS + (0.75 * periodS) / Math.sqrt(1 - zeta * zeta), 0, 0, 600)
  return peaks
}

describe('computeSpectrum against an independent high-accuracy integration (odex)', () => {
  const dtS = 0.01
  const accel = randomRecord(20_260_101, 301)
  const periodsS = logPeriodGrid(0.01, 10, 13)
  const dampingRatios = [0, 0.02, 0.05, 0.1, 0.2, 0.3]
  const reference = dampingRatios.map((zeta) =>
    periodsS.map((periodS) => odexPeaks(accel, dtS, periodS, zeta)),
  )

  for (const method of SPECTRUM_METHODS) {
    it(`${method}: every ordinate within 0.5% for T = 0.01–10 s and ζ = 0–30%`, () => {
      const { curves } = computeSpectrum({ accelMPerS2: accel, dtS }, { dampingRatios, periodsS, method })
      let worst = 0
      curves.forEach((curve, d) => {
        periodsS.forEach((periodS, p) => {
          const exact = reference[d]![p]!
          const omega = (2 * Math.PI) / periodS
          const errors = [
            curve.sdM[p]! / exact.sd - 1,
            curve.svMPerS[p]! / exact.sv - 1,
            curve.saMPerS2[p]! / exact.sa - 1,
            curve.psaMPerS2[p]! / (omega * omega * exact.sd) - 1,
            curve.psvMPerS[p]! / (omega * exact.sd) - 1,
          ]
          for (const error of errors) worst = Math.max(worst, Math.abs(error))
        })
      })
      expect(worst).toBeLessThan(TARGET)
    })
  }
})

describe('Newmark on a long record at low damping, against the piecewise-exact recurrence', () => {
  // Period error accumulates over the whole record when ζ = 0, the worst case of the sub-step rule.
  // The reference is the piecewise-exact recurrence (checked against odex above, exact at step ends)
  // run with eight times the sub-steps its own rule picks, so its peak reading is 64 times finer.
  const dtS = 0.01
  const record = { accelMPerS2: randomRecord(7, 6001), dtS }
  const periodsS = [0.05, 0.2, 1, 5]
  const dampingRatios = [0, 0.02]
  const plan = planSpectrum(6001, dtS, { dampingRatios, periodsS, method: 'piecewise-exact' })
  const oscillators = dampingRatios.flatMap((dampingRatio, d) =>
    periodsS.map((periodS, p) => ({
      periodS,
      dampingRatio,
      subSteps: 8 * plan.subSteps[d * periodsS.length + p]!,
    })),
  )
  const reference = sweepOscillators(record, oscillators, 'piecewise-exact')

  for (const method of ['newmark-average', 'newmark-linear'] as const) {
    it(`${method}: SD, SV and SA within 0.5% over 60 s at ζ = 0 and 2%`, () => {
      const { curves, warnings } = computeSpectrum(record, { dampingRatios, periodsS, method })
      expect(warnings).toEqual([])
      curves.forEach((curve, d) => {
        periodsS.forEach((_, p) => {
          const index = d * periodsS.length + p
          expect(Math.abs(curve.sdM[p]! / reference.sdM[index]! - 1)).toBeLessThan(TARGET)
          expect(Math.abs(curve.svMPerS[p]! / reference.svMPerS[index]! - 1)).toBeLessThan(TARGET)
          expect(Math.abs(curve.saMPerS2[p]! / reference.saMPerS2[index]! - 1)).toBeLessThan(TARGET)
        })
      })
    })
  }
})
