/**
 * Ground-motion time histories (acceleration, velocity, displacement) as
 * stacked panels sharing one time axis: data in, SVG text out, no DOM.
 */
import { scaleLinear } from 'd3-scale'
import { line } from 'd3-shape'
import {
  type PlotRect,
  gridMarkup,
  linearTicks,
  plotClipMarkup,
  plotFrameMarkup,
  xAxisMarkup,
  yAxisMarkup,
} from './axes.js'
import { palette } from './palette.js'
import { FONT_FAMILY, escapeXml, px, safeId } from './svgMarkup.js'
import { type DisplayUnit, type MotionKind, checkUnit, fromSI } from './units.js'

export interface TimeHistoryData {
  /** Sample interval of every series, s. */
  dtS: number
  /** Time of the first sample, s (0 when omitted). */
  startTimeS?: number
  accelerationMPerS2: ArrayLike<number>
  velocityMPerS?: ArrayLike<number>
  displacementM?: ArrayLike<number>
}

export interface TimeHistoryChartOptions {
  widthPx?: number
  heightPx?: number
  title?: string
  note?: string
  accelerationUnit?: DisplayUnit
  velocityUnit?: DisplayUnit
  displacementUnit?: DisplayUnit
  /** The visible time window (zoom), s; the whole record when omitted. */
  timeDomainS?: [number, number]
  /** Prefix of the ids inside the SVG; give each chart on a page its own. */
  id?: string
}

export interface TimeHistoryPanelFrame {
  kind: MotionKind
  unit: DisplayUnit
  top: number
  height: number
  /** Largest |value| in the whole record, in `unit`, and when it occurs (s). */
  peak: number
  peakTimeS: number
}

export interface TimeHistoryChartFrame {
  widthPx: number
  heightPx: number
  plotLeft: number
  plotWidth: number
  timeDomainS: [number, number]
  /** The whole record's time span, s. */
  recordSpanS: [number, number]
  panels: TimeHistoryPanelFrame[]
}

export interface TimeHistoryChart {
  svg: string
  frame: TimeHistoryChartFrame
}

const PANEL_GAP_PX = 22
const KIND_NAMES: Record<MotionKind, string> = {
  acceleration: 'Acceleration',
  velocity: 'Velocity',
  displacement: 'Displacement',
}
const KIND_COLOURS: Record<MotionKind, string> = {
  acceleration: palette.ink,
  velocity: '#2b7f83',
  displacement: '#7a4c86',
}

const peakFormat = (v: number) => Number(v.toPrecision(4)).toString()

/**
 * Indices of the samples to draw for [i0, i1]: every sample when they fit,
 * otherwise the first, lowest and highest sample of each pixel column, in time
 * order, so peaks survive the thinning.
 */
export function thinForDrawing(values: ArrayLike<number>, i0: number, i1: number, columns: number): number[] {
  const count = i1 - i0 + 1
  if (count <= 0) return []
  const all: number[] = []
  if (count <= columns * 3) {
    for (let i = i0; i <= i1; i++) all.push(i)
    return all
  }
  const perColumn = count / columns
  for (let c = 0; c < columns; c++) {
    const a = i0 + Math.floor(c * perColumn)
    const b = Math.min(i1, i0 + Math.floor((c + 1) * perColumn) - 1)
    let lo = a
    let hi = a
    for (let i = a; i <= b; i++) {
      const v = values[i] ?? 0
      if (v < (values[lo] ?? 0)) lo = i
      if (v > (values[hi] ?? 0)) hi = i
    }
    for (const i of [...new Set([a, lo, hi])].sort((p, q) => p - q)) all.push(i)
  }
  if (all[all.length - 1] !== i1) all.push(i1)
  return all
}

/**
 * Builds the chart. Throws a RangeError when dtS is not positive, a series
 * length differs from the acceleration's, or a unit does not suit its panel.
 */
export function buildTimeHistoryChart(
  data: TimeHistoryData,
  options: TimeHistoryChartOptions = {},
): TimeHistoryChart {
  if (!(data.dtS > 0)) throw new RangeError('dtS must be positive')
  const n = data.accelerationMPerS2.length
  const panelsIn: { kind: MotionKind; values: ArrayLike<number>; unit: DisplayUnit }[] = [
    { kind: 'acceleration', values: data.accelerationMPerS2, unit: options.accelerationUnit ?? 'g' },
  ]
  if (data.velocityMPerS) {
    panelsIn.push({ kind: 'velocity', values: data.velocityMPerS, unit: options.velocityUnit ?? 'm/s' })
  }
  if (data.displacementM) {
    panelsIn.push({
      kind: 'displacement',
      values: data.displacementM,
      unit: options.displacementUnit ?? 'm',
    })
  }
  for (const p of panelsIn) {
    checkUnit(p.kind, p.unit)
    if (p.values.length !== n) {
      throw new RangeError(`${p.kind} has ${p.values.length} samples, acceleration has ${n}`)
    }
  }

  const widthPx = options.widthPx ?? 720
  const heightPx = options.heightPx ?? 120 + 150 * panelsIn.length
  const id = safeId(options.id ?? 'ordinate-history')
  const t0 = data.startTimeS ?? 0
  const recordSpanS: [number, number] = [t0, t0 + Math.max(1, n - 1) * data.dtS]
  const requested = options.timeDomainS ?? recordSpanS
  const timeDomainS: [number, number] = [
    Math.max(recordSpanS[0], Math.min(requested[0], requested[1])),
    Math.min(recordSpanS[1], Math.max(requested[0], requested[1])),
  ]
  if (!(timeDomainS[1] > timeDomainS[0])) {
    timeDomainS[0] = recordSpanS[0]
    timeDomainS[1] = recordSpanS[1]
  }

  const plotLeft = 72
  const plotWidth = Math.max(40, widthPx - plotLeft - 20)
  const top = options.title ? 36 : 14
  const bottomPx = 44 + (options.note ? 18 : 0) + 6
  const panelHeight = Math.max(
    30,
    (heightPx - top - bottomPx - PANEL_GAP_PX * (panelsIn.length - 1)) / panelsIn.length,
  )
  const x = scaleLinear()
    .domain(timeDomainS)
    .range([plotLeft, plotLeft + plotWidth])
  const xTicks = linearTicks(x.ticks(10))
  const i0 = Math.max(0, Math.floor((timeDomainS[0] - t0) / data.dtS))
  const i1 = Math.min(n - 1, Math.ceil((timeDomainS[1] - t0) / data.dtS))
  const time = (i: number) => t0 + i * data.dtS

  const parts: string[] = []
  const panels: TimeHistoryPanelFrame[] = []
  const descriptions: string[] = []
  panelsIn.forEach((p, k) => {
    const values = Array.from(p.values, (v) => fromSI(v, p.unit))
    let peakIndex = 0
    values.forEach((v, i) => {
      if (Math.abs(v) > Math.abs(values[peakIndex] ?? 0)) peakIndex = i
    })
    const peak = Math.abs(values[peakIndex] ?? 0)
    const peakTimeS = time(peakIndex)
    const plot: PlotRect = {
      left: plotLeft,
      top: top + k * (panelHeight + PANEL_GAP_PX),
      width: plotWidth,
      height: panelHeight,
    }
    const limit = peak > 0 ? peak : 1
    const y = scaleLinear()
      .domain([-limit, limit])
      .nice(4)
      .range([plot.top + plot.height, plot.top])
    const yTicks = linearTicks(y.ticks(4))
    const clip = `${id}-clip-${k}`
    const indices = thinForDrawing(values, i0, i1, Math.round(plotWidth))
    const d = line<number>()
      .x((i) => x(time(i)))
      .y((i) => y(values[i] ?? 0))
      .digits(2)(indices)
    const name = KIND_NAMES[p.kind]
    const peakText = `peak ${peakFormat(peak)} ${p.unit} at ${peakFormat(peakTimeS)} s`
    descriptions.push(`${name} (${p.unit}), ${peakText}`)
    parts.push(
      plotClipMarkup(clip, plot),
      `<g>${gridMarkup(x, xTicks, y, yTicks, plot)}</g>`,
      `<line x1="${px(plot.left)}" y1="${px(y(0))}" x2="${px(plot.left + plot.width)}" y2="${px(y(0))}" stroke="${palette.ruleStrong}"/>`,
      `<g clip-path="url(#${clip})">`,
      d
        ? `<path d="${d}" fill="none" stroke="${KIND_COLOURS[p.kind]}" stroke-width="1" stroke-linejoin="round"/>`
        : '',
      peakTimeS >= timeDomainS[0] && peakTimeS <= timeDomainS[1]
        ? `<circle cx="${px(x(peakTimeS))}" cy="${px(y(values[peakIndex] ?? 0))}" r="3" fill="none" stroke="${palette.ochre}" stroke-width="1.5"/>`
        : '',
      '</g>',
      plotFrameMarkup(plot),
      yAxisMarkup(y, yTicks, plot, `${name} (${p.unit})`),
      `<text x="${px(plot.left + plot.width - 6)}" y="${px(plot.top + 14)}" text-anchor="end" fill="${palette.text}">${escapeXml(peakText)}</text>`,
    )
    if (k === panelsIn.length - 1) parts.push(xAxisMarkup(x, xTicks, plot, 'Time t (s)'))
    panels.push({ kind: p.kind, unit: p.unit, top: plot.top, height: plot.height, peak, peakTimeS })
  })

  const lastPanel = panels[panels.length - 1]
  const head: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${widthPx} ${heightPx}" width="${widthPx}" height="${heightPx}" role="img" aria-labelledby="${id}-title ${id}-desc" font-family="${escapeXml(FONT_FAMILY)}" font-size="12">`,
    `<title id="${id}-title">${escapeXml(options.title ?? 'Ground motion against time')}</title>`,
    `<desc id="${id}-desc">${escapeXml(
      `${n} samples at ${data.dtS} s, shown from ${peakFormat(timeDomainS[0])} to ${peakFormat(timeDomainS[1])} s. ${descriptions.join('; ')}.`,
    )}</desc>`,
    `<rect x="0" y="0" width="${widthPx}" height="${heightPx}" fill="${palette.surface}"/>`,
  ]
  if (options.title) {
    head.push(
      `<text x="${px(plotLeft)}" y="22" fill="${palette.text}" font-size="15" font-weight="600">${escapeXml(options.title)}</text>`,
    )
  }
  if (options.note && lastPanel) {
    parts.push(
      `<text x="${px(plotLeft)}" y="${px(lastPanel.top + lastPanel.height + 58)}" fill="${palette.textMuted}" font-size="11">${escapeXml(options.note)}</text>`,
    )
  }
  return {
    svg: [...head, ...parts, '</svg>'].join(''),
    frame: { widthPx, heightPx, plotLeft, plotWidth, timeDomainS, recordSpanS, panels },
  }
}

/** The chart as SVG text; see {@link buildTimeHistoryChart}. */
export function timeHistoryChartSvg(data: TimeHistoryData, options?: TimeHistoryChartOptions): string {
  return buildTimeHistoryChart(data, options).svg
}
