import { describe, expect, it } from 'vitest'
import { harmonicResponse, stepOvershootRatio } from './closedForms.js'
import { type SpectrumMethod, computeSpectrum, planSpectrum, refineSweep } from './computeSpectrum.js'
import { demoRecord, mulberry32 } from './demo/demoRecords.js'
import { freeVibration } from './freeVibration.js'
import { NEWMARK_LINEAR_STABILITY_LIMIT, SPECTRUM_METHODS } from './oscillatorRecurrence.js'
import { parseRecord } from './parseRecord.js'
import { defaultPeriodsS, logPeriodGrid } from './periods.js'
import { PEAK_PICKING_BUDGET } from './subSteps.js'
import type { OscillatorSpec } from './sweepOscillators.js'
import { warningMessages } from '../warningMessages.js'
import { recordParameters } from './recordParameters.js'

/** The engine's accuracy target: every ordinate within 0.5% of the exact response. */
const TARGET = 0.005

const relative = (value: number, expected: number) => Math.abs(value / expected - 1)

function sampled(f: (t: number) => number, dtS: number, points: number): Float64Array {
  return Float64Array.from({ length: points }, (_, i) => f(i * dtS))
}

describe('computeSpectrum', () => {
  describe('step ground acceleration a₀ from rest (closed form, Chopra ch. 4)', () => {
    // The record is a₀ from the first sample: the oscillator at rest feels a jump at t = 0.
    // It lasts 30 s, so the free vibration after it never exceeds the first overshoot.
    const a0 = 2
    const record = { accelMPerS2: new Float64Array(3001).fill(a0), dtS: 0.01 }
    const periodsS = logPeriodGrid(0.01, 10, 13)

    for (const zeta of [0, 0.05, 0.1, 0.2]) {
      it(`PSA/a₀ = 1 + exp(−πζ/√(1−ζ²)) = ${stepOvershootRatio(zeta).toFixed(5)} at ζ = ${zeta}, every period and method`, () => {
        for (const method of SPECTRUM_METHODS) {
          const { curves } = computeSpectrum(record, { dampingRatios: [zeta], periodsS, method })
          const curve = curves[0]!
          periodsS.forEach((periodS, p) => {
            expect(relative(curve.psaMPerS2[p]! / a0, stepOvershootRatio(zeta))).toBeLessThan(TARGET)
            if (zeta === 0) expect(relative(curve.saMPerS2[p]!, curve.psaMPerS2[p]!)).toBeLessThan(TARGET)
            if (zeta > 0) {
              // The first overshoot, at half a damped period, is the peak.
              const halfDampedPeriod = periodS / (2 * Math.sqrt(1 - zeta * zeta))
              expect(Math.abs(curve.sdTimeS[p]! - halfDampedPeriod)).toBeLessThan(periodS / 20)
            }
          })
        }
      })
    }
  })

  describe('harmonic ground acceleration a_g = A sin(ω̄t) from rest (closed form, Chopra ch. 3)', () => {
    const A = 1.5
    const forcingPeriodS = 0.5
    const forcingOmega = (2 * Math.PI) / forcingPeriodS
    const cycles = 30
    // 400 samples per forcing cycle: the straight lines between samples depart from the sine
    // by at most (ω̄Δt)²/8 = 3e-5 of A, well inside the tolerance.
    const dtS = forcingPeriodS / 400
    const points = cycles * 400 + 1
    const endS = (points - 1) * dtS
    const record = { accelMPerS2: sampled((t) => A * Math.sin(forcingOmega * t), dtS, points), dtS }

    /** Peak |u| of the closed form over the record and the free vibration after it (sampled finely). */
    function exactSd(periodS: number, zeta: number): number {
      const omega = (2 * Math.PI) / periodS
      let peak = 0
      const fine = Math.min(dtS, periodS / 2000)
      for (let t = 0; t <= endS; t += fine)
        peak = Math.max(peak, Math.abs(harmonicResponse(-A, forcingOmega, omega, zeta, t).u))
      const end = harmonicResponse(-A, forcingOmega, omega, zeta, endS)
      for (let t = 0; t <= periodS; t += periodS / 2000)
        peak = Math.max(peak, Math.abs(freeVibration(end.u, end.v, omega, zeta, t).u))
      return peak
    }

    for (const { ratio, zeta } of [
      { ratio: 0.5, zeta: 0.05 },
      { ratio: 1, zeta: 0.02 },
      { ratio: 1, zeta: 0 },
      { ratio: 2, zeta: 0.1 },
    ]) {
      it(`SD matches the steady-state-plus-transient closed form at ω̄/ω = ${ratio}, ζ = ${zeta}`, () => {
        const periodS = forcingPeriodS * ratio
        const expected = exactSd(periodS, zeta)
        for (const method of SPECTRUM_METHODS) {
          const { curves } = computeSpectrum(record, { dampingRatios: [zeta], periodsS: [periodS], method })
          expect(relative(curves[0]!.sdM[0]!, expected)).toBeLessThan(TARGET)
        }
      })
    }

    it('at resonance the response settles to the steady amplitude A/(2ζω²) (Chopra sec. 3.2)', () => {
      const zeta = 0.05
      const omega = forcingOmega
      const { curves } = computeSpectrum(record, {
        dampingRatios: [zeta],
        periodsS: [forcingPeriodS],
        method: 'newmark-average',
      })
      // After 30 cycles the transient has decayed to e^(−ζω·15 s) ≈ 1e-4 of it.
      expect(relative(curves[0]!.sdM[0]!, A / (2 * zeta * omega * omega))).toBeLessThan(TARGET)
    })
  })

  describe('limits', () => {
    // A record with content below 3 Hz: one cycle of a 0.5 s sine then a slow 2 s cycle.
    const dtS = 0.01
    const pulse = (t: number) =>
      t < 0.5 ? 3 * Math.sin(4 * Math.PI * t) : t < 2.5 ? -0.5 * Math.sin(Math.PI * (t - 0.5)) : 0
    const record = { accelMPerS2: sampled(pulse, dtS, 401), dtS }
    const params = recordParameters(record.accelMPerS2, dtS)

    it('PSA and SA approach PGA as T → 0 (DOMAIN; quasi-static response u ≈ −a_g/ω²)', () => {
      // At T = 2 ms the quasi-static error is of order (3 Hz / 500 Hz)² ≈ 4e-5.
      for (const method of SPECTRUM_METHODS) {
        const { curves } = computeSpectrum(record, {
          dampingRatios: [0, 0.05, 0.3],
          periodsS: [0.002],
          method,
        })
        for (const curve of curves) {
          expect(relative(curve.psaMPerS2[0]!, params.pgaMPerS2)).toBeLessThan(1e-3)
          expect(relative(curve.saMPerS2[0]!, params.pgaMPerS2)).toBeLessThan(1e-3)
        }
      }
    })

    it('SD approaches PGD and SV approaches PGV as T → ∞ (DOMAIN; the mass stays still)', () => {
      // The ground comes to rest displaced, so PGD is the final displacement; at T = 1000 s the
      // spring force over the 4 s record is of order (ωt)² ≈ 6e-4 of the motion.
      for (const method of SPECTRUM_METHODS) {
        const { curves } = computeSpectrum(record, { dampingRatios: [0.05], periodsS: [1000], method })
        expect(relative(curves[0]!.sdM[0]!, params.pgdM)).toBeLessThan(2e-3)
        expect(relative(curves[0]!.svMPerS[0]!, params.pgvMPerS)).toBeLessThan(2e-3)
      }
    })
  })

  describe('on the standard demo record', () => {
    const parsed = parseRecord(demoRecord('synthetic-far-field').text)
    const record = { accelMPerS2: parsed.accelMPerS2, dtS: parsed.dtS }
    const periodsS = defaultPeriodsS().filter((_, i) => i % 10 === 0)
    const dampingRatios = [0.02, 0.05, 0.2]
    const results = new Map(
      SPECTRUM_METHODS.map(
        (method) => [method, computeSpectrum(record, { dampingRatios, periodsS, method })] as const,
      ),
    )

    it('the three methods agree within 1% (each is within 0.5% of the exact response)', () => {
      const reference = results.get('piecewise-exact')!
      for (const method of ['newmark-average', 'newmark-linear'] as SpectrumMethod[]) {
        results.get(method)!.curves.forEach((curve, d) => {
          const other = reference.curves[d]!
          for (const key of ['sdM', 'svMPerS', 'saMPerS2', 'psaMPerS2'] as const) {
            curve[key].forEach((value, p) => expect(relative(value, other[key][p]!)).toBeLessThan(2 * TARGET))
          }
        })
      }
    })

    it('PSV = ω·SD and PSA = ω²·SD', () => {
      const curve = results.get('newmark-average')!.curves[1]!
      periodsS.forEach((periodS, p) => {
        const omega = (2 * Math.PI) / periodS
        expect(curve.psvMPerS[p]).toBe(omega * curve.sdM[p]!)
        expect(curve.psaMPerS2[p]).toBe(omega * omega * curve.sdM[p]!)
      })
    })

    it('gives the same bits on a second run and with the JavaScript kernel', () => {
      const first = results.get('newmark-average')!
      const again = computeSpectrum(record, { dampingRatios, periodsS, method: 'newmark-average' })
      const js = computeSpectrum(record, { dampingRatios, periodsS, method: 'newmark-average', kernel: 'js' })
      expect(js.methodStatement.kernel).toBe('js')
      for (const other of [again, js]) {
        other.curves.forEach((curve, d) => {
          expect(Array.from(curve.sdM)).toEqual(Array.from(first.curves[d]!.sdM))
          expect(Array.from(curve.saMPerS2)).toEqual(Array.from(first.curves[d]!.saMPerS2))
          expect(Array.from(curve.sdTimeS)).toEqual(Array.from(first.curves[d]!.sdTimeS))
        })
      }
    })

    it('an ordinate does not depend on the other periods in the sweep', () => {
      const alone = computeSpectrum(record, {
        dampingRatios: [0.05],
        periodsS: [periodsS[7]!],
        method: 'newmark-average',
      })
      expect(alone.curves[0]!.sdM[0]).toBe(results.get('newmark-average')!.curves[1]!.sdM[7])
    })

    it('states the method, time step, sub-steps, tail and engine version', () => {
      const statement = results.get('newmark-linear')!.methodStatement
      expect(statement.method).toBe('newmark-linear')
      expect(statement.newmarkGamma).toBe(0.5)
      expect(statement.newmarkBeta).toBeCloseTo(1 / 6, 15)
      expect(statement.recordDtS).toBe(0.005)
      expect(statement.subStepsMin).toBe(1)
      expect(statement.subStepsMax).toBeGreaterThan(1)
      expect(statement.freeVibrationTail).toContain('Included')
      expect(statement.engineVersion).toMatch(/^ordinate-spectra \d+\.\d+\.\d+$/)
      expect(results.get('piecewise-exact')!.methodStatement.newmarkBeta).toBeNull()
    })

    it('reports progress several times, rising to 1', () => {
      const seen: number[] = []
      computeSpectrum(record, {
        dampingRatios: [0.05],
        periodsS: defaultPeriodsS(),
        method: 'newmark-average',
        onProgress: (fraction) => seen.push(fraction),
      })
      expect(seen.length).toBeGreaterThan(5)
      expect(seen[seen.length - 1]).toBe(1)
      seen.forEach((fraction, i) => expect(fraction).toBeGreaterThanOrEqual(seen[i - 1] ?? 0))
    })
  })

  describe('the sub-step rule', () => {
    it('keeps linear-acceleration Newmark within its stability limit h/T ≤ √3/π', () => {
      const periodsS = defaultPeriodsS()
      const plan = planSpectrum(8001, 0.02, { dampingRatios: [0, 0.3], periodsS, method: 'newmark-linear' })
      plan.subSteps.forEach((m, i) => {
        // Where Newmark would need more than the cap, the exact recurrence runs instead (subSteps.ts).
        if (plan.recurrences[i] !== 'newmark-linear') return
        expect(0.02 / m / periodsS[i % periodsS.length]!).toBeLessThanOrEqual(NEWMARK_LINEAR_STABILITY_LIMIT)
      })
      expect(plan.recurrences.filter((r) => r === 'newmark-linear').length).toBeGreaterThan(periodsS.length)
    })

    it('needs no sub-steps for long periods and more for short ones', () => {
      const plan = planSpectrum(8001, 0.005, {
        dampingRatios: [0.05],
        periodsS: [0.01, 1, 10],
        method: 'newmark-average',
      })
      expect(plan.subSteps[2]).toBe(1)
      expect(plan.subSteps[0]).toBeGreaterThan(plan.subSteps[1]!)
    })
  })

  it('warns about periods shorter than 2Δt and damping above 30%', () => {
    const record = { accelMPerS2: sampled((t) => Math.sin(5 * t), 0.01, 200), dtS: 0.01 }
    const { warnings } = computeSpectrum(record, {
      dampingRatios: [0.4],
      periodsS: [0.01, 0.05],
      method: 'piecewise-exact',
    })
    expect(warnings).toEqual([
      { code: 'periods-below-two-dt', periods: 1, twoDtS: 0.02 },
      { code: 'damping-above-accuracy-limit', accuracyTarget: 0.005, dampingLimit: 0.3 },
    ])
    expect(warningMessages(warnings)).toEqual([
      '1 period is shorter than 2Δt = 0.02 s, the shortest the record resolves; ordinates there follow the straight lines between samples.',
      'The 0.5% accuracy target is demonstrated for damping up to 30%.',
    ])
  })

  it('warns when refinement reaches the sub-step cap with the bound on peaks between steps still above budget', () => {
    // White noise (a test signal) at ζ = 0 and T = Δt/16: the first pass already takes the cap. A
    // pair, whose directional peaks are read at step ends; a record's are searched between steps.
    const random = mulberry32(7)
    const accelMPerS2 = Float64Array.from({ length: 400 }, () => random() - 0.5)
    const settings = { dampingRatios: [0], periodsS: [0.01], method: 'piecewise-exact' as const }
    const recordCodes = computeSpectrum({ accelMPerS2, dtS: 0.16 }, settings).warnings.map((w) => w.code)
    expect(recordCodes).toEqual(['periods-below-two-dt'])
    const { warnings } = computeSpectrum(
      { accel1MPerS2: accelMPerS2, accel2MPerS2: accelMPerS2.map((a) => -0.5 * a), dtS: 0.16 },
      { ...settings, combinations: ['rotd100'] },
    )
    expect(warnings).toContainEqual({
      code: 'peak-bound-above-budget',
      oscillators: 1,
      maxSubSteps: 1024,
      budget: 0.0025,
    })
  })

  describe('the refinement driver', () => {
    /** A stand-in solve whose bound falls only by half per solve, from `start` × the budget. */
    function slowSolver(start: number) {
      const oscillators: OscillatorSpec[] = [{ periodS: 1, dampingRatio: 0.05, subSteps: 1 }]
      let solves = 0
      const solver = {
        solve: () => void solves++,
        peakBound: () => (start * PEAK_PICKING_BUDGET) / 2 ** (solves - 1),
        stepsRun: 0,
      }
      return { oscillators, solver, solves: () => solves }
    }

    it('re-checks the result of the last pass', () => {
      // First pass, then three refinements: the bound goes 8, 4, 2, 1 × budget, the last at budget.
      const settled = slowSolver(8)
      expect(refineSweep(settled.oscillators, settled.solver, undefined)).toBe(0)
      expect(settled.solves()).toBe(4)
      // 16, 8, 4, 2 × budget: the last pass leaves it above budget, below the cap, and it is counted.
      const above = slowSolver(16)
      expect(refineSweep(above.oscillators, above.solver, undefined)).toBe(1)
      expect(above.solves()).toBe(4)
      expect(above.oscillators[0]!.subSteps).toBeLessThan(1024)
    })
  })

  it('rejects invalid settings', () => {
    const record = { accelMPerS2: new Float64Array(20), dtS: 0.01 }
    const base = { dampingRatios: [0.05], periodsS: [1], method: 'newmark-average' as const }
    expect(() => computeSpectrum(record, { ...base, dampingRatios: [0.5] })).toThrow(RangeError)
    expect(() => computeSpectrum(record, { ...base, periodsS: [0] })).toThrow(RangeError)
    expect(() => computeSpectrum(record, { ...base, dampingRatios: [] })).toThrow(RangeError)
    expect(() => computeSpectrum({ ...record, dtS: -1 }, base)).toThrow(RangeError)
    expect(() => computeSpectrum(record, { ...base, method: 'euler' as SpectrumMethod })).toThrow(RangeError)
  })
})
