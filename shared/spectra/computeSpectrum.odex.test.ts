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
 * the dense output at ≥ 200 points per period (under-reading by at most 1 − cos(π/200) ≈ 1.2e-4 of a
 * sinusoid's peak, a fortieth of the tolerance) and ≥ 16 per sample interval (the
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
  const perSample = Math.max(16, Math.ceil((200 * dtS) / periodS))
  for (let i = 0; i + 1 < accel.length; i++)
    segment(i * dtS, (i + 1) * dtS, accel[i]!, accel[i + 1]!, perSample)
  const endS = (accel.length - 1) * dtS
  segment(endS, endS + (0.75 * periodS) / Math.sqrt(1 - zeta * zeta), 0, 0, 600)
  return peaks
}

/** A one-cycle velocity pulse of period Tp (a near-fault pulse, synthetic) with a little noise. */
function pulseRecord(seed: number, dtS: number, points: number, pulsePeriodS: number): Float64Array {
  const random = mulberry32(seed)
  const omega = (2 * Math.PI) / pulsePeriodS
  const startS = 1
  return Float64Array.from({ length: points }, (_, i) => {
    const t = i * dtS - startS
    const pulse = t >= 0 && t <= pulsePeriodS ? 6 * Math.cos(omega * t) : 0
    return pulse + 0.3 * (random() - 0.5) * Math.sin((Math.PI * i) / (points - 1))
  })
}

/** Content just below the Nyquist frequency: samples alternate in sign under a slow beat, plus noise. */
function nyquistRecord(seed: number, points: number): Float64Array {
  const random = mulberry32(seed)
  return Float64Array.from(
    { length: points },
    (_, i) => (3 * Math.cos(0.96 * Math.PI * i) + (random() - 0.5)) * Math.sin((Math.PI * i) / (points - 1)),
  )
}

interface ReferenceCase {
  name: string
  accel: Float64Array
  dtS: number
  periodsS: number[]
  dampingRatios: number[]
}

/**
 * The cases the rules must not hide a corner in. Periods are chosen to keep the reference
 * (odex on every sample interval) to some seconds: the shortest periods, where peaks fall
 * between samples, and a few long ones.
 */
const CASES: ReferenceCase[] = [
  {
    name: 'white noise, 301 samples at Δt = 0.01 s',
    accel: randomRecord(20_260_101, 301),
    dtS: 0.01,
    periodsS: logPeriodGrid(0.01, 10, 13),
    dampingRatios: [0, 0.02, 0.05, 0.1, 0.2, 0.3],
  },
  {
    name: 'near-fault pulse (Tp = 1 s), 8 s at Δt = 0.01 s',
    accel: pulseRecord(5, 0.01, 801, 1),
    dtS: 0.01,
    periodsS: [0.01, 0.05, 0.3, 1, 3],
    dampingRatios: [0, 0.05],
  },
  {
    name: 'content near Nyquist, 400 samples at Δt = 0.005 s',
    accel: nyquistRecord(11, 400),
    dtS: 0.005,
    periodsS: [0.01, 0.0104, 0.011, 0.1],
    dampingRatios: [0, 0.05],
  },
  {
    name: 'long record, 60 s at Δt = 0.02 s, periods down to 0.01 s',
    accel: randomRecord(3, 3001),
    dtS: 0.02,
    periodsS: [0.01, 0.027, 0.3],
    dampingRatios: [0, 0.05],
  },
  {
    name: 'short record, 1 s at Δt = 0.001 s',
    accel: randomRecord(17, 1001),
    dtS: 0.001,
    periodsS: [0.01, 0.1, 1],
    dampingRatios: [0, 0.05],
  },
  {
    name: '16 samples at Δt = 0.01 s',
    accel: randomRecord(23, 16),
    dtS: 0.01,
    periodsS: logPeriodGrid(0.01, 10, 7),
    dampingRatios: [0, 0.05, 0.3],
  },
  {
    name: '16 samples at Δt = 0.02 s',
    accel: randomRecord(29, 16),
    dtS: 0.02,
    periodsS: logPeriodGrid(0.01, 10, 7),
    dampingRatios: [0, 0.05],
  },
  {
    name: 'long record at zero damping, T < 2Δt: 120 s at Δt = 0.01 s',
    accel: randomRecord(31, 12_001),
    dtS: 0.01,
    periodsS: [0.0126],
    dampingRatios: [0],
  },
]

const references = new Map<ReferenceCase, Peaks[][]>()
function referenceOf(entry: ReferenceCase): Peaks[][] {
  let reference = references.get(entry)
  if (!reference) {
    reference = entry.dampingRatios.map((zeta) =>
      entry.periodsS.map((periodS) => odexPeaks(entry.accel, entry.dtS, periodS, zeta)),
    )
    references.set(entry, reference)
  }
  return reference
}

interface Worst {
  error: number
  where: string
}

/** Largest relative error of SD, SV, SA, PSV and PSA against the reference, and where it is. */
function worstError(
  entry: ReferenceCase,
  ordinate: (d: number, p: number) => { sd: number; sv: number; sa: number },
): Worst {
  const reference = referenceOf(entry)
  let worst: Worst = { error: 0, where: '' }
  entry.dampingRatios.forEach((zeta, d) => {
    entry.periodsS.forEach((periodS, p) => {
      const exact = reference[d]![p]!
      const got = ordinate(d, p)
      const errors: [string, number][] = [
        ['SD', got.sd / exact.sd - 1],
        ['SV', got.sv / exact.sv - 1],
        ['SA', got.sa / exact.sa - 1],
      ]
      for (const [name, error] of errors) {
        if (Math.abs(error) > Math.abs(worst.error))
          worst = { error, where: `${name} at T = ${periodS} s, ζ = ${zeta}` }
      }
    })
  })
  return worst
}

const describeWorst = (worst: Worst) => `${(100 * worst.error).toFixed(4)}% (${worst.where})`

describe('computeSpectrum against an independent high-accuracy integration (odex)', () => {
  for (const method of SPECTRUM_METHODS) {
    it(`${method}: every ordinate within 0.5% on every reference case`, () => {
      let overall: Worst & { name: string } = { error: 0, where: '', name: '' }
      for (const entry of CASES) {
        const { curves } = computeSpectrum(
          { accelMPerS2: entry.accel, dtS: entry.dtS },
          { dampingRatios: entry.dampingRatios, periodsS: entry.periodsS, method },
        )
        const worst = worstError(entry, (d, p) => {
          const curve = curves[d]!
          const omega = (2 * Math.PI) / entry.periodsS[p]!
          // PSV and PSA are ω·SD and ω²·SD, so their error is SD's (checked in computeSpectrum.test.ts).
          expect(curve.psaMPerS2[p]).toBe(omega * omega * curve.sdM[p]!)
          return { sd: curve.sdM[p]!, sv: curve.svMPerS[p]!, sa: curve.saMPerS2[p]! }
        })
        console.log(`${method}, ${entry.name}: worst ${describeWorst(worst)}`)
        if (Math.abs(worst.error) > Math.abs(overall.error)) overall = { ...worst, name: entry.name }
        expect(Math.abs(worst.error), `${entry.name}: ${describeWorst(worst)}`).toBeLessThan(TARGET)
      }
      console.log(`${method}: worst over all cases ${describeWorst(overall)}, ${overall.name}`)
    })
  }

  it('the search between steps matters: piecewise-exact without it, and no sub-steps, misses the 0.5%', () => {
    // The same recurrence and step as the engine's piecewise-exact sweep, peaks read at step ends only.
    let worst: Worst & { name: string } = { error: 0, where: '', name: '' }
    for (const entry of CASES) {
      const oscillators = entry.dampingRatios.flatMap((dampingRatio) =>
        entry.periodsS.map((periodS) => ({
          periodS,
          dampingRatio,
          subSteps: 1,
          reading: 'step-ends' as const,
        })),
      )
      const peaks = sweepOscillators(
        { accelMPerS2: entry.accel, dtS: entry.dtS },
        oscillators,
        'piecewise-exact',
      )
      const found = worstError(entry, (d, p) => {
        const index = d * entry.periodsS.length + p
        return { sd: peaks.sdM[index]!, sv: peaks.svMPerS[index]!, sa: peaks.saMPerS2[index]! }
      })
      if (Math.abs(found.error) > Math.abs(worst.error)) worst = { ...found, name: entry.name }
    }
    console.log(`piecewise-exact with the search off: worst ${describeWorst(worst)}, ${worst.name}`)
    expect(Math.abs(worst.error)).toBeGreaterThan(TARGET)
  })
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
