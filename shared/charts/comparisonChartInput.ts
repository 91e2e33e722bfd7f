/**
 * The inputs of the comparison chart, built in one place so the comparison workspace and
 * the exports (SVG, PNG, the PDF sheet) draw the same chart from the same comparison view
 * (GET /api/comparisons/:id).
 */
import type { ComparisonDrawing } from '../schemas/comparisons.js'
import type { SpectrumChartInput } from '../schemas/sheets.js'
import type { AxisScale } from './axes.js'
import { recordHues } from './palette.js'
import { STANDARD_GRAVITY_M_PER_S2 } from '../spectra/units.js'

export interface ComparisonChartView {
  xScale: AxisScale
  yScale: AxisScale
  /** Draw each record as scaled by its factor (when the comparison has scaling). */
  scaled: boolean
}

/** Suites are compared on log axes, as the comparison issue asks. */
export const DEFAULT_COMPARISON_CHART_VIEW: ComparisonChartView = {
  xScale: 'log',
  yScale: 'log',
  scaled: true,
}

/** PSA in g (null where undefined) to m/s² for the chart, which skips non-finite points. */
const toSI = (valuesG: Array<number | null>, factor = 1) =>
  valuesG.map((v) => (v === null ? Number.NaN : v * factor * STANDARD_GRAVITY_M_PER_S2))

export function comparisonChartInput(
  view: ComparisonDrawing,
  chartView: ComparisonChartView = DEFAULT_COMPARISON_CHART_VIEW,
): SpectrumChartInput {
  const periodsS = view.periodsS
  const scaled = chartView.scaled && view.scaling !== null && view.suite.scaled !== null
  const suite = scaled && view.suite.scaled ? view.suite.scaled : view.suite.unscaled
  const series: SpectrumChartInput['data']['series'] = view.curves.map((curve, i) => {
    const factor = scaled && curve.scaleFactor !== null ? curve.scaleFactor : 1
    return {
      colour: recordHues[i % recordHues.length],
      label: scaled ? `${curve.label} × ${Number(factor.toPrecision(3))}` : curve.label,
      periodsS,
      values: toSI(curve.psaG, factor),
      role: 'record',
    }
  })
  const meanLabel = `${suite.kind === 'geometric' ? 'Geometric' : 'Arithmetic'} mean${scaled ? ' of the scaled records' : ''}`
  series.push({ label: meanLabel, periodsS, values: toSI(suite.meanG), role: 'mean' })
  if (view.target) {
    series.push({ label: view.target.label, periodsS, values: toSI(view.target.saG), role: 'target' })
    series.push({
      label: '90% of the target',
      periodsS,
      values: toSI(view.target.target90G),
      role: 'target90',
    })
  }
  const input: SpectrumChartInput = {
    data: { series },
    options: {
      quantity: 'PSA',
      unit: 'g',
      xScale: chartView.xScale,
      yScale: chartView.yScale,
      note: `${view.labels.damping}; ${view.labels.mean}${view.labels.combination ? `; ${view.labels.combination}` : ''}${
        view.target?.beyondDefinedRange ? '; the target is not defined over the whole period range' : ''
      }`,
    },
  }
  const shortfall = view.target ? shortfallBand(periodsS, suite.meanG, view.target.target90G) : null
  if (shortfall) input.data.shortfall = shortfall
  if (suite.lowerG && suite.upperG) {
    input.data.band = {
      label: suite.label,
      periodsS,
      lower: toSI(suite.lowerG),
      upper: toSI(suite.upperG),
    }
  }
  if (view.scaling) {
    input.options.periodRange = {
      minS: view.scaling.fromS,
      maxS: view.scaling.toS,
      label: `Scaling range ${view.scaling.fromS}–${view.scaling.toS} s`,
    }
  }
  return input
}

/**
 * Where the mean falls below 90% of the target: the band between the two there, NaN elsewhere
 * (the chart leaves gaps at NaN). The crossing between two periods is not interpolated, so a
 * shortfall shows from the first period below to the last. Null when the mean never falls short.
 */
export function shortfallBand(
  periodsS: number[],
  meanG: Array<number | null>,
  target90G: Array<number | null>,
): NonNullable<SpectrumChartInput['data']['shortfall']> | null {
  const lower: number[] = []
  const upper: number[] = []
  let any = false
  periodsS.forEach((_, i) => {
    const m = meanG[i]
    const t = target90G[i]
    const short = m != null && t != null && m < t
    any ||= short
    lower.push(short ? m * STANDARD_GRAVITY_M_PER_S2 : Number.NaN)
    upper.push(short ? t * STANDARD_GRAVITY_M_PER_S2 : Number.NaN)
  })
  return any ? { label: 'Mean below 90% of the target', periodsS, lower, upper } : null
}
