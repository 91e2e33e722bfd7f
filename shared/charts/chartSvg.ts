/**
 * One entry point from a chart's inputs (as sheets and exports carry them) to its SVG: the
 * spectrum chart, or the four-way log plot when the inputs ask for it. The screen and every
 * export go through here, so they draw the same chart.
 */
import type { SpectrumChartInput } from '../schemas/sheets.js'
import { spectrumChartSvg } from './spectrumChart.js'
import { type TripartiteUnits, tripartiteChartSvg } from './tripartiteChart.js'

export type ChartKind = 'spectrum' | 'tripartite'

export function chartSvg(input: SpectrumChartInput): string {
  const { tripartite, ...options } = input.options
  return tripartite
    ? tripartiteChartSvg(input.data, { ...options, units: tripartite })
    : spectrumChartSvg(input.data, options)
}

/**
 * The same curves drawn on the four-way log plot. The inputs' values must be PSA, PSV or SD
 * (the plot converts them to PSV); the axis scales and ordinate unit no longer apply.
 */
export function asTripartite(input: SpectrumChartInput, units: TripartiteUnits): SpectrumChartInput {
  const { unit: _unit, xScale: _x, yScale: _y, yDomain: _yDomain, ...options } = input.options
  return { data: input.data, options: { ...options, tripartite: units } }
}
