import { describe, expect, it } from 'vitest'
import type { ComparisonView } from '../schemas/comparisons.js'
import { comparisonChartInput } from './comparisonChartInput.js'
import { STANDARD_GRAVITY_M_PER_S2 as g } from '../spectra/units.js'

const view = {
  comparison: {},
  periodsS: [0.5, 1, 2],
  curves: [
    { runId: 'a', label: 'Motion A', revision: 1, psaG: [1, 1, 1], scaleFactor: 2 },
    { runId: 'b', label: 'Motion B', revision: 1, psaG: [1, 3, null], scaleFactor: 2 },
  ],
  suite: {
    unscaled: {
      kind: 'arithmetic',
      label: 'Arithmetic mean ± 1σ',
      meanG: [1, 2, 1],
      lowerG: [1, 0.6, 1],
      upperG: [1, 3.4, 1],
    },
    scaled: {
      kind: 'arithmetic',
      label: 'Arithmetic mean ± 1σ',
      meanG: [2, 4, 2],
      lowerG: [2, 1.2, 2],
      upperG: [2, 6.8, 2],
    },
  },
  target: {
    label: 'User target',
    notes: [],
    saG: [1, 2, 4],
    target90G: [0.9, 1.8, 3.6],
    beyondDefinedRange: false,
  },
  scaling: {
    rule: 'suite-90',
    ruleLabel: 'One factor',
    fromS: 0.5,
    toS: 2,
    check: { passed: true, minRatio: 0.9, governingPeriodS: 2, label: '' },
  },
  labels: {
    title: 'Suite',
    damping: 'ζ = 5%',
    mean: 'Arithmetic mean of 2 runs',
    combination: null,
    grid: '3 periods',
  },
  caution: '',
} as unknown as ComparisonView

describe('comparisonChartInput', () => {
  const input = comparisonChartInput(view)

  it('draws each record scaled by its factor, in SI, skipping undefined ordinates', () => {
    expect(input.data.series[1]).toMatchObject({ label: 'Motion B × 2', role: 'record' })
    expect(input.data.series[1]?.values.slice(0, 2)).toEqual([2 * g, 6 * g])
    expect(Number.isNaN(input.data.series[1]?.values[2])).toBe(true)
  })

  it('adds the scaled mean, its ±1σ band, the target and 90% of it', () => {
    expect(input.data.series.map((s) => s.role)).toEqual(['record', 'record', 'mean', 'target', 'target90'])
    expect(input.data.series[2]?.values).toEqual([2 * g, 4 * g, 2 * g])
    expect(input.data.band?.upper).toEqual([2 * g, 6.8 * g, 2 * g])
    expect(input.options).toMatchObject({ quantity: 'PSA', unit: 'g', xScale: 'log', yScale: 'log' })
    expect(input.options.periodRange).toEqual({ minS: 0.5, maxS: 2, label: 'Scaling range 0.5–2 s' })
  })

  it('draws the records as recorded when asked to', () => {
    const unscaled = comparisonChartInput(view, { xScale: 'log', yScale: 'linear', scaled: false })
    expect(unscaled.data.series[0]).toMatchObject({ label: 'Motion A', values: [g, g, g] })
    expect(unscaled.data.series[2]?.values).toEqual([g, 2 * g, g])
  })
})
