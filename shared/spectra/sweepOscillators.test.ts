import { describe, expect, it } from 'vitest'
import { demoRecord } from './demo/demoRecords.js'
import { jsKernel, wasmKernel } from './kernel/sweepKernel.js'
import { parseRecord } from './parseRecord.js'
import { type OscillatorSpec, sweepOscillators, sweepOscillatorsStaged } from './sweepOscillators.js'
import { logPeriodGrid } from './periods.js'

/**
 * Start values of the running peaks (OscillatorSpec.start) only thin out the steps the kernel
 * lists for the search between steps. Whatever they are, the peaks and their times are those of
 * the sweep from 0, bit for bit: below the peaks they leave out only steps that cannot hold one,
 * and a start value the peak does not end above has the oscillator swept again from 0.
 */
describe('sweepOscillators with start values', () => {
  const record = parseRecord(demoRecord('synthetic-far-field').text)
  const job = { accelMPerS2: record.accelMPerS2.subarray(0, 3001), dtS: record.dtS }
  const oscillators: OscillatorSpec[] = [0.02, 0.1, 0.5, 2, 8].flatMap((periodS) =>
    [0, 0.05].map((dampingRatio) => ({
      periodS,
      dampingRatio,
      subSteps: 2,
      reading: 'between-steps' as const,
    })),
  )

  for (const [name, kernel] of [
    ['js', jsKernel()],
    ['wasm-simd', wasmKernel()!],
  ] as const) {
    it(`gives the peaks of the sweep from 0 for start values below the peaks, at them and above them (${name})`, () => {
      for (const method of ['piecewise-exact', 'newmark-average'] as const) {
        const fromZero = sweepOscillators(job, oscillators, method, { kernel })
        // The start values are fractions of the peaks over the record (without the free-vibration tail).
        const overRecord = sweepOscillators(job, oscillators, method, { kernel, freeVibrationTail: false })
        for (const factor of [0.5, 0.99, 1, 1.5]) {
          let sweptAgain = 0
          const started = oscillators.map((oscillator, i) => ({
            ...oscillator,
            start: {
              sd: factor * overRecord.sdM[i]!,
              sv: factor * overRecord.svMPerS[i]!,
              sa: factor * overRecord.saMPerS2[i]!,
            },
          }))
          const fromStart = sweepOscillators(job, started, method, {
            kernel,
            onSweptAgain: (steps) => (sweptAgain += steps),
          })
          for (const key of ['sdM', 'svMPerS', 'saMPerS2', 'sdTimeS', 'saTimeS'] as const)
            expect(Array.from(fromStart[key]), `${method} ×${factor} ${key}`).toEqual(
              Array.from(fromZero[key]),
            )
          // Below the peaks nothing is swept again; at them or above, every oscillator is (a peak
          // must end strictly above its start), and its steps are counted.
          const all = oscillators.length * (job.accelMPerS2.length - 1) * 2
          expect(sweptAgain, `${method} ×${factor}`).toBe(factor < 1 ? 0 : all)
        }
      }
    })
  }

  it('in two stages (neighbours first), gives the peaks of one sweep, bit for bit, on fine, coarse and unsorted grids', () => {
    const grids = [
      logPeriodGrid(0.01, 10, 120),
      logPeriodGrid(0.05, 5, 12),
      [3, 0.02, 0.5, 0.07, 1.1, 0.3, 8, 0.011, 2, 0.15, 0.04, 5],
    ]
    for (const grid of grids) {
      const specs: OscillatorSpec[] = [0, 0.05, 0.2].flatMap((dampingRatio) =>
        grid.map((periodS) => ({ periodS, dampingRatio, subSteps: 1, reading: 'between-steps' as const })),
      )
      const whole = sweepOscillators(job, specs, 'piecewise-exact')
      const staged = sweepOscillatorsStaged(job, specs, 'piecewise-exact')
      for (const key of ['sdM', 'svMPerS', 'saMPerS2', 'sdTimeS', 'saTimeS'] as const)
        expect(Array.from(staged[key]), `${grid.length} periods, ${key}`).toEqual(Array.from(whole[key]))
    }
  })
})
