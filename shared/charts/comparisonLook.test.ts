import { describe, expect, it } from 'vitest'
import type { ComparisonDrawing } from '../schemas/comparisons.js'
import { comparisonChartInput, shortfallBand } from './comparisonChartInput.js'
import { palette, recordHues } from './palette.js'
import { spectrumChartSvg } from './spectrumChart.js'

/**
 * The comparison chart's own visual code: records in one hue family, the mean in the brand
 * ink, the ±σ band a tint with edge lines, the shortfall below 90% of the target shaded in
 * brick, and the scaling range a tinted background band.
 */
const periodsS = [0.1, 0.2, 0.5, 1, 2]
const view = {
  periodsS,
  curves: [
    { runId: 'a', label: 'Synthetic A', psaG: [0.5, 0.8, 0.6, 0.3, 0.1], scaleFactor: null },
    { runId: 'b', label: 'Synthetic B', psaG: [0.4, 0.7, 0.7, 0.2, 0.1], scaleFactor: null },
  ],
  suite: {
    unscaled: {
      kind: 'arithmetic',
      label: 'Arithmetic mean ± 1σ',
      meanG: [0.45, 0.75, 0.65, 0.25, 0.1],
      lowerG: [0.38, 0.68, 0.58, 0.18, 0.1],
      upperG: [0.52, 0.82, 0.72, 0.32, 0.1],
    },
    scaled: null,
  },
  // 90% of the target: above the mean at 1 s and 2 s only.
  target: { label: 'Site target', saG: [0.5, 0.6, 0.6, 0.4, 0.2], target90G: [0.45, 0.54, 0.54, 0.36, 0.18] },
  scaling: { fromS: 0.2, toS: 2 },
  labels: { damping: 'ζ = 5%', mean: 'Arithmetic mean of 2 runs', combination: null },
} as unknown as ComparisonDrawing

describe('the comparison chart look', () => {
  const input = comparisonChartInput(view)
  const svg = spectrumChartSvg(input.data, input.options)

  it('draws the records in the one hue family and the mean in the brand ink', () => {
    expect(input.data.series.slice(0, 2).map((s) => s.colour)).toEqual([recordHues[0], recordHues[1]])
    expect(svg).toContain(`stroke="${recordHues[0]}"`)
    expect(svg).toMatch(new RegExp(`stroke="${palette.ink}" stroke-width="2.5"`))
  })

  it('draws the band as a tint with an edge line each side', () => {
    expect(svg.match(/data-role="band-edge"/g)).toHaveLength(2)
  })

  it('shades the shortfall only where the mean is below 90% of the target', () => {
    const band = shortfallBand(periodsS, view.suite.unscaled.meanG, view.target!.target90G)
    expect(band?.lower.map(Number.isFinite)).toEqual([false, false, false, true, true])
    expect(svg).toContain('data-role="shortfall"')
    expect(svg).toContain('>Mean below 90% of the target</text>')
  })

  it('leaves the shortfall out when the mean never falls short', () => {
    expect(shortfallBand(periodsS, [1, 1, 1, 1, 1], [0.5, 0.5, 0.5, 0.5, 0.5])).toBeNull()
  })

  it('draws the scaling range as a tinted background band under the grid', () => {
    const band = svg.indexOf('data-role="period-range"')
    expect(band).toBeGreaterThan(0)
    expect(band).toBeLessThan(svg.indexOf(`stroke="${palette.gridMajor}"`))
  })
})
