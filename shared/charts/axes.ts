/** Tick choice, grid, frame and axis markup shared by the spectrum, time-history and Fourier charts. */
import { format } from 'd3-format'
import { palette } from './palette.js'
import { escapeXml, px } from './svgMarkup.js'

export type AxisScale = 'log' | 'linear'

export interface PlotRect {
  left: number
  top: number
  width: number
  height: number
}

/** `grid` gets a faint line; `labelled` gets a stronger line and a number. */
export interface Ticks {
  grid: number[]
  labelled: number[]
}

const tickText = format('~g')

/** Tick labels: up to six significant digits, trailing zeros dropped ("0.01", "2", "10"). */
export function formatTick(value: number): string {
  return tickText(value)
}

/** k·10^e without the binary round-off of the product (0.30000000000000004 → 0.3). */
function decadeMultiple(k: number, e: number): number {
  return Number((k * 10 ** e).toPrecision(12))
}

/**
 * Ticks for a base-10 log axis over [min, max], min > 0: a faint line at every
 * k·10^e (k = 1…9), labels at 1, 2 and 5 × 10^e when the axis spans at most
 * two decades and at 10^e only when it spans more.
 */
export function logTicks(min: number, max: number): Ticks {
  if (!(min > 0) || !(max > min)) throw new RangeError('log axis needs 0 < min < max')
  const first = Math.floor(Math.log10(min))
  const last = Math.ceil(Math.log10(max))
  const labelSteps = last - first <= 2 ? [1, 2, 5] : [1]
  const grid: number[] = []
  const labelled: number[] = []
  const inside = (v: number) => v >= min * (1 - 1e-9) && v <= max * (1 + 1e-9)
  for (let e = first; e <= last; e++) {
    for (let k = 1; k <= 9; k++) {
      const v = decadeMultiple(k, e)
      if (!inside(v)) continue
      if (labelSteps.includes(k)) labelled.push(v)
      else grid.push(v)
    }
  }
  return { grid, labelled }
}

/** Ticks for a linear axis, at d3's "nice" steps (1, 2 or 5 × 10^e). */
export function linearTicks(ticks: number[]): Ticks {
  return { grid: [], labelled: ticks.map((t) => Number(t.toPrecision(12))) }
}

function gridLine(x1: number, y1: number, x2: number, y2: number, colour: string): string {
  return `<line x1="${px(x1)}" y1="${px(y1)}" x2="${px(x2)}" y2="${px(y2)}" stroke="${colour}" stroke-width="1"/>`
}

/** Vertical grid lines for an x axis. */
function xGridMarkup(map: (v: number) => number, ticks: Ticks, plot: PlotRect): string {
  const bottom = plot.top + plot.height
  return [
    ...ticks.grid.map((t) => gridLine(map(t), plot.top, map(t), bottom, palette.gridMinor)),
    ...ticks.labelled.map((t) => gridLine(map(t), plot.top, map(t), bottom, palette.gridMajor)),
  ].join('')
}

/** Horizontal grid lines for a y axis. */
function yGridMarkup(map: (v: number) => number, ticks: Ticks, plot: PlotRect): string {
  const right = plot.left + plot.width
  return [
    ...ticks.grid.map((t) => gridLine(plot.left, map(t), right, map(t), palette.gridMinor)),
    ...ticks.labelled.map((t) => gridLine(plot.left, map(t), right, map(t), palette.gridMajor)),
  ].join('')
}

/** The grid of both axes, drawn under the data. */
export function gridMarkup(
  x: (v: number) => number,
  xTicks: Ticks,
  y: (v: number) => number,
  yTicks: Ticks,
  plot: PlotRect,
): string {
  return xGridMarkup(x, xTicks, plot) + yGridMarkup(y, yTicks, plot)
}

function plotRectAttributes(plot: PlotRect): string {
  return `x="${px(plot.left)}" y="${px(plot.top)}" width="${px(plot.width)}" height="${px(plot.height)}"`
}

/** A clip path of the plot area, so curves stop at its edges. */
export function plotClipMarkup(clipId: string, plot: PlotRect): string {
  return `<defs><clipPath id="${clipId}"><rect ${plotRectAttributes(plot)}/></clipPath></defs>`
}

/** The frame around the plot area, drawn over the data. */
export function plotFrameMarkup(plot: PlotRect): string {
  return `<rect ${plotRectAttributes(plot)} fill="none" stroke="${palette.ruleStrong}"/>`
}

/** Tick marks, numbers and the axis title below a plot. `label` is escaped here. */
export function xAxisMarkup(
  map: (v: number) => number,
  ticks: Ticks,
  plot: PlotRect,
  label: string | null,
): string {
  const bottom = plot.top + plot.height
  const parts = ticks.labelled.map((t) => {
    const x = px(map(t))
    return (
      `<line x1="${x}" y1="${px(bottom)}" x2="${x}" y2="${px(bottom + 4)}" stroke="${palette.ruleStrong}"/>` +
      `<text x="${x}" y="${px(bottom + 16)}" text-anchor="middle" fill="${palette.textMuted}">${escapeXml(formatTick(t))}</text>`
    )
  })
  if (label !== null) {
    parts.push(
      `<text x="${px(plot.left + plot.width / 2)}" y="${px(bottom + 34)}" text-anchor="middle" fill="${palette.text}" font-weight="600">${escapeXml(label)}</text>`,
    )
  }
  return parts.join('')
}

/** Tick marks, numbers and the rotated axis title left of a plot. `label` is escaped here. */
export function yAxisMarkup(map: (v: number) => number, ticks: Ticks, plot: PlotRect, label: string): string {
  const parts = ticks.labelled.map((t) => {
    const y = map(t)
    return (
      `<line x1="${px(plot.left - 4)}" y1="${px(y)}" x2="${px(plot.left)}" y2="${px(y)}" stroke="${palette.ruleStrong}"/>` +
      `<text x="${px(plot.left - 7)}" y="${px(y + 4)}" text-anchor="end" fill="${palette.textMuted}">${escapeXml(formatTick(t))}</text>`
    )
  })
  const cx = plot.left - 50
  const cy = plot.top + plot.height / 2
  parts.push(
    `<text transform="translate(${px(cx)},${px(cy)}) rotate(-90)" text-anchor="middle" fill="${palette.text}" font-weight="600">${escapeXml(label)}</text>`,
  )
  return parts.join('')
}

/** The frame of a plot with its two axes: the last layer over the data of a single-panel chart. */
export function framedAxesMarkup(
  x: (v: number) => number,
  xTicks: Ticks,
  y: (v: number) => number,
  yTicks: Ticks,
  plot: PlotRect,
  labels: { x: string; y: string },
): string {
  return (
    plotFrameMarkup(plot) + xAxisMarkup(x, xTicks, plot, labels.x) + yAxisMarkup(y, yTicks, plot, labels.y)
  )
}
