/**
 * The inputs of the spectrum chart for one run, built in one place so the run page and the
 * exports (SVG, PNG, the PDF sheet) draw the very same chart from the same spectrum.
 */
import type { RunMethod } from '../schemas/runs.js'
import type { SpectrumChartInput } from '../schemas/sheets.js'
import type { AxisScale } from './axes.js'
import { COMBINATION_LABELS, type Combination } from '../vocabulary/combinations.js'
import type { DisplayUnit, SpectrumQuantity } from './units.js'

/** The ordinates of one damping ratio, in SI, in the order of the spectrum's periods. */
export interface RunSpectrumCurve {
  dampingRatio: number
  /** Two-component runs tag each curve with how it combines the components. */
  combination?: Combination
  sdM: ArrayLike<number>
  svMPerS: ArrayLike<number>
  saMPerS2: ArrayLike<number>
  psvMPerS: ArrayLike<number>
  psaMPerS2: ArrayLike<number>
}

export interface RunSpectrumLike {
  periodsS: ArrayLike<number>
  curves: RunSpectrumCurve[]
  /** What produced the numbers (the engine's JSON has both), stated under the chart. */
  method?: RunMethod
  methodStatement?: { recordDtS: number }
}

/** Short names of the solvers, for the line under the chart. */
export const RUN_METHOD_NAMES: Record<RunMethod, string> = {
  'newmark-average': 'Newmark-β, average acceleration',
  'newmark-linear': 'Newmark-β, linear acceleration',
  'piecewise-exact': 'piecewise-exact recurrence',
}

/** What the engineer chose to look at. */
export interface SpectrumView {
  quantity: SpectrumQuantity
  unit?: DisplayUnit
  xScale: AxisScale
  yScale: AxisScale
}

/** The run page opens on PSA in g against a log period axis, as codes plot design spectra. */
export const DEFAULT_SPECTRUM_VIEW: SpectrumView = {
  quantity: 'PSA',
  unit: 'g',
  xScale: 'log',
  yScale: 'linear',
}

const QUANTITY_KEYS = {
  PSA: 'psaMPerS2',
  SA: 'saMPerS2',
  PSV: 'psvMPerS',
  SV: 'svMPerS',
  SD: 'sdM',
} as const satisfies Record<SpectrumQuantity, keyof RunSpectrumCurve>

/**
 * One curve per damping ratio (and combination), with the periods in ascending order so a
 * list of periods given in any order still draws as a line; titled with the quantity and
 * the record, and, where the spectrum says, noted with the solver and Δt.
 */
export function runSpectrumChartInput(
  spectrum: RunSpectrumLike,
  recordLabel: string,
  view: SpectrumView = DEFAULT_SPECTRUM_VIEW,
): SpectrumChartInput {
  const periods = Array.from(spectrum.periodsS)
  const order = periods.map((_, i) => i).sort((a, b) => (periods[a] as number) - (periods[b] as number))
  const periodsS = order.map((i) => periods[i] as number)
  const key = QUANTITY_KEYS[view.quantity]
  const series = spectrum.curves.map((curve) => {
    const values = curve[key]
    const combination = curve.combination ? COMBINATION_LABELS[curve.combination] : null
    return {
      label: combination ? `${recordLabel} (${combination})` : recordLabel,
      periodsS,
      values: order.map((i) => values[i] as number),
      role: 'record' as const,
      dampingRatio: curve.dampingRatio,
    }
  })
  const options: SpectrumChartInput['options'] = {
    quantity: view.quantity,
    xScale: view.xScale,
    yScale: view.yScale,
    title: `${view.quantity} of ${recordLabel}`,
  }
  if (spectrum.method && spectrum.methodStatement) {
    options.note = `${RUN_METHOD_NAMES[spectrum.method]}; Δt = ${spectrum.methodStatement.recordDtS} s`
  }
  if (view.unit) options.unit = view.unit
  return { data: { series }, options }
}
