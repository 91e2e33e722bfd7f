import { describe, expect, it } from 'vitest'
import { runSpectrumChartInput } from './runSpectrumChartInput.js'

const spectrum = {
  periodsS: [1, 0.1, 0.5],
  curves: [
    {
      dampingRatio: 0.05,
      sdM: [3, 1, 2],
      svMPerS: [0, 0, 0],
      saMPerS2: [0, 0, 0],
      psvMPerS: [0, 0, 0],
      psaMPerS2: [30, 10, 20],
    },
    {
      dampingRatio: 0.05,
      combination: 'rotd50' as const,
      sdM: [0, 0, 0],
      svMPerS: [0, 0, 0],
      saMPerS2: [0, 0, 0],
      psvMPerS: [0, 0, 0],
      psaMPerS2: [3, 1, 2],
    },
  ],
}

describe('runSpectrumChartInput', () => {
  it('draws one record curve per damping ratio, periods ascending, PSA in g on a log period axis by default', () => {
    const input = runSpectrumChartInput(spectrum, 'Record A')
    expect(input.options).toEqual({
      quantity: 'PSA',
      unit: 'g',
      xScale: 'log',
      yScale: 'linear',
      title: 'PSA of Record A',
    })
    expect(input.data.series[0]).toEqual({
      label: 'Record A',
      periodsS: [0.1, 0.5, 1],
      values: [10, 20, 30],
      role: 'record',
      dampingRatio: 0.05,
    })
  })

  it('names a two-component combination in the label', () => {
    expect(runSpectrumChartInput(spectrum, 'Pair B').data.series[1]?.label).toBe('Pair B (RotD50)')
  })

  it('draws the quantity the engineer chose', () => {
    const input = runSpectrumChartInput(spectrum, 'Record A', {
      quantity: 'SD',
      unit: 'mm',
      xScale: 'linear',
      yScale: 'log',
    })
    expect(input.data.series[0]?.values).toEqual([1, 2, 3])
    expect(input.options).toMatchObject({
      quantity: 'SD',
      unit: 'mm',
      xScale: 'linear',
      yScale: 'log',
      title: 'SD of Record A',
    })
  })

  it('states the solver and the record’s Δt under the chart when the spectrum carries them', () => {
    const input = runSpectrumChartInput(
      { ...spectrum, method: 'piecewise-exact', methodStatement: { recordDtS: 0.005 } },
      'A',
    )
    expect(input.options.note).toBe('piecewise-exact recurrence; Δt = 0.005 s')
  })
})
