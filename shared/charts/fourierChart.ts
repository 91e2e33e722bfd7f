/**
 * Fourier amplitude spectra on log-log axes, before and after processing, with the filter's
 * gain on its own right-hand axis and the filter corners marked: data in, SVG text out, no DOM.
 */
import { scaleLog } from 'd3-scale'
import { line } from 'd3-shape'
import { type PlotRect, formatTick, framedAxesMarkup, gridMarkup, logTicks, plotClipMarkup } from './axes.js'
import { palette } from './palette.js'
import { FONT_FAMILY, escapeXml, px, safeId } from './svgMarkup.js'

export interface FourierCurve {
  label: string
  frequencyHz: ArrayLike<number>
  /** Amplitudes, m/s (values ≤ 0 are left out on the log axis). */
  amplitudeMPerS: ArrayLike<number>
  colour: string
  dashed?: boolean
}

export interface FourierChartInput {
  curves: FourierCurve[]
  /** The filter's gain (0–1) on the right-hand axis; omitted without a filter. */
  gain?: { frequencyHz: ArrayLike<number>; gain: ArrayLike<number> }
  /** Filter corners to mark, Hz. */
  corners?: { label: string; hz: number }[]
  title?: string
  widthPx?: number
  heightPx?: number
  id?: string
}

const GAIN_COLOUR = palette.ochre

function positivePoints(xs: ArrayLike<number>, ys: ArrayLike<number>): [number, number][] {
  const out: [number, number][] = []
  for (let i = 0; i < Math.min(xs.length, ys.length); i++) {
    const x = xs[i]!
    const y = ys[i]!
    if (x > 0 && y > 0 && Number.isFinite(y)) out.push([x, y])
  }
  return out
}

export function buildFourierChart(input: FourierChartInput): string {
  const widthPx = input.widthPx ?? 760
  const heightPx = input.heightPx ?? 380
  const id = safeId(input.id ?? 'fourier')
  const plot: PlotRect = { left: 78, top: input.title ? 34 : 14, width: widthPx - 78 - 62, height: 0 }
  plot.height = heightPx - plot.top - 74
  const series = input.curves.map((c) => ({ ...c, points: positivePoints(c.frequencyHz, c.amplitudeMPerS) }))
  const all = series.flatMap((s) => s.points)
  const fMin = Math.min(...all.map((p) => p[0]))
  const fMax = Math.max(...all.map((p) => p[0]))
  const aMax = Math.max(...all.map((p) => p[1]))
  // Six decades below the peak keep the noise floor from flattening the plot.
  const aMin = Math.max(Math.min(...all.map((p) => p[1])), aMax * 1e-6)
  if (!all.length || !(fMax > fMin) || !(aMax > aMin)) {
    return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${widthPx} ${heightPx}" role="img" aria-label="No Fourier spectrum to draw"></svg>`
  }
  const x = scaleLog()
    .domain([fMin, fMax])
    .range([plot.left, plot.left + plot.width])
  const y = scaleLog()
    .domain([aMin, aMax * 1.5])
    .range([plot.top + plot.height, plot.top])
    .clamp(true)
  const gainY = scaleLog()
    .domain([1e-4, 1.5])
    .range([plot.top + plot.height, plot.top])
    .clamp(true)
  const xTicks = logTicks(fMin, fMax)
  const yTicks = logTicks(aMin, aMax * 1.5)
  const path = line<[number, number]>()
    .x((p) => x(p[0]))
    .y((p) => y(p[1]))
  const parts: string[] = [
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${widthPx} ${heightPx}" width="${widthPx}" height="${heightPx}" font-family="${FONT_FAMILY}" font-size="12" role="img" aria-labelledby="${id}-title">`,
    `<title id="${id}-title">${escapeXml(input.title ?? 'Fourier amplitude spectrum')}</title>`,
    plotClipMarkup(`${id}-clip`, plot),
    `<rect x="0" y="0" width="${widthPx}" height="${heightPx}" fill="${palette.surface}"/>`,
  ]
  if (input.title)
    parts.push(
      `<text x="${px(plot.left)}" y="20" fill="${palette.text}" font-weight="600" font-size="14">${escapeXml(input.title)}</text>`,
    )
  parts.push(gridMarkup(x, xTicks, y, yTicks, plot))
  parts.push(`<g clip-path="url(#${id}-clip)">`)
  for (const c of input.corners ?? []) {
    if (!(c.hz >= fMin && c.hz <= fMax)) continue
    parts.push(
      `<line x1="${px(x(c.hz))}" y1="${px(plot.top)}" x2="${px(x(c.hz))}" y2="${px(plot.top + plot.height)}" stroke="${GAIN_COLOUR}" stroke-width="1" stroke-dasharray="2 3"/>`,
      `<text x="${px(x(c.hz) + 4)}" y="${px(plot.top + 12)}" fill="${GAIN_COLOUR}">${escapeXml(`${c.label} ${formatTick(Number(c.hz.toPrecision(4)))} Hz`)}</text>`,
    )
  }
  for (const s of series) {
    parts.push(
      `<path d="${path(s.points) ?? ''}" fill="none" stroke="${s.colour}" stroke-width="1.4"${s.dashed ? ' stroke-dasharray="5 3"' : ''}/>`,
    )
  }
  if (input.gain) {
    const gainPath = line<[number, number]>()
      .x((p) => x(p[0]))
      .y((p) => gainY(p[1]))
    const pts = positivePoints(input.gain.frequencyHz, input.gain.gain).filter(
      (p) => p[0] >= fMin && p[0] <= fMax,
    )
    parts.push(`<path d="${gainPath(pts) ?? ''}" fill="none" stroke="${GAIN_COLOUR}" stroke-width="1.6"/>`)
  }
  parts.push('</g>')
  parts.push(
    framedAxesMarkup(x, xTicks, y, yTicks, plot, { x: 'Frequency (Hz)', y: 'Fourier amplitude (m/s)' }),
  )
  if (input.gain) {
    const right = plot.left + plot.width
    for (const g of [1e-4, 1e-3, 1e-2, 0.1, 0.5, 1]) {
      parts.push(
        `<line x1="${px(right)}" y1="${px(gainY(g))}" x2="${px(right + 4)}" y2="${px(gainY(g))}" stroke="${GAIN_COLOUR}"/>`,
        `<text x="${px(right + 7)}" y="${px(gainY(g) + 4)}" fill="${GAIN_COLOUR}">${escapeXml(formatTick(g))}</text>`,
      )
    }
    parts.push(
      `<text transform="translate(${px(right + 50)},${px(plot.top + plot.height / 2)}) rotate(90)" text-anchor="middle" fill="${GAIN_COLOUR}" font-weight="600">Filter gain</text>`,
    )
  }
  // Legend below the axis title.
  let lx = plot.left
  const ly = heightPx - 12
  const legend = [
    ...input.curves.map((c) => ({ label: c.label, colour: c.colour, dashed: c.dashed ?? false })),
    ...(input.gain ? [{ label: 'Filter gain (right axis)', colour: GAIN_COLOUR, dashed: false }] : []),
  ]
  for (const item of legend) {
    parts.push(
      `<line x1="${px(lx)}" y1="${px(ly - 4)}" x2="${px(lx + 22)}" y2="${px(ly - 4)}" stroke="${item.colour}" stroke-width="2"${item.dashed ? ' stroke-dasharray="5 3"' : ''}/>`,
      `<text x="${px(lx + 27)}" y="${px(ly)}" fill="${palette.text}">${escapeXml(item.label)}</text>`,
    )
    lx += 27 + item.label.length * 6.2 + 18
  }
  parts.push('</svg>')
  return parts.join('')
}
