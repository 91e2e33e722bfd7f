/**
 * Response-spectrum chart: data in, SVG text out. No DOM and no text
 * measuring, so the browser and the server's PDF/PNG exports draw the same
 * bytes from the same data.
 */
import { extent, max as arrayMax, min as arrayMin } from 'd3-array'
import { scaleLinear, scaleLog } from 'd3-scale'
import { area, line } from 'd3-shape'
import {
  type AxisScale,
  type PlotRect,
  type Ticks,
  framedAxesMarkup,
  gridMarkup,
  linearTicks,
  logTicks,
  plotClipMarkup,
} from './axes.js'
import { layoutLegend, wrapText } from './legendLayout.js'
import { palette, seriesColours } from './palette.js'
import { FONT_FAMILY, escapeXml, px, safeId } from './svgMarkup.js'
import { type DisplayUnit, type SpectrumQuantity, checkUnit, fromSI, spectrumQuantities } from './units.js'

/**
 * What a curve is, which decides how it is drawn:
 * - `record`: one record's spectrum (colours cycle through the series colours);
 * - `mean`: the suite mean, heavy, in the brand ink;
 * - `band`: an edge of a spread band, such as mean + σ, thin and dashed;
 * - `target`: a design spectrum, ochre;
 * - `target90`: 90% of the target, ochre and dashed.
 */
export type SeriesRole = 'record' | 'mean' | 'band' | 'target' | 'target90'

export interface SpectrumSeries {
  label: string
  periodsS: ArrayLike<number>
  /** Ordinates in SI: m/s² for PSA and SA, m/s for PSV and SV, m for SD. */
  values: ArrayLike<number>
  role: SeriesRole
  /** Shown in the legend as "ζ = 5%". */
  dampingRatio?: number
  /** An SVG stroke-dasharray such as "6 3", overriding the role's. */
  dash?: string
  /** A stroke colour overriding the role's (the comparison chart's record hues). */
  colour?: string
}

/** A shaded region between two curves (for example mean ± σ), in SI. */
export interface SpectrumBand {
  label: string
  periodsS: ArrayLike<number>
  lower: ArrayLike<number>
  upper: ArrayLike<number>
}

export interface SpectrumChartData {
  series: SpectrumSeries[]
  /** Drawn as a tint with thin edge lines. */
  band?: SpectrumBand
  /** Where the mean falls below 90% of the target: shaded between the two, in brick. */
  shortfall?: SpectrumBand
}

export interface SpectrumChartOptions {
  quantity: SpectrumQuantity
  /** Defaults to g for accelerations, m/s for velocities and m for SD. */
  unit?: DisplayUnit
  xScale?: AxisScale
  yScale?: AxisScale
  widthPx?: number
  heightPx?: number
  title?: string
  /** One line under the legend, e.g. "EN 1998-1 spectrum defined to 4 s". */
  note?: string
  /** Vertical lines marking a period range, e.g. the scaling range 0.2T₁–2T₁. */
  periodRange?: { minS: number; maxS: number; label?: string }
  /** Longest usable period of a high-pass filtered record, s: longer periods are shaded. */
  usablePeriodMaxS?: number
  /** Fixes the period axis (s) instead of fitting the data. */
  xDomainS?: [number, number]
  /** Fixes the ordinate axis, in the display unit. */
  yDomain?: [number, number]
  /** Prefix of the ids inside the SVG; give each chart on a page its own. */
  id?: string
}

/** Where the plot sits and how it maps, so a wrapper can turn a pointer into a period. */
export interface SpectrumChartFrame {
  widthPx: number
  heightPx: number
  plot: PlotRect
  xScale: AxisScale
  yScale: AxisScale
  xDomainS: [number, number]
  yDomain: [number, number]
  unit: DisplayUnit
}

export interface SpectrumChart {
  svg: string
  frame: SpectrumChartFrame
}

interface RoleStyle {
  colour: string
  widthPx: number
  dash: string | null
}

const ROLE_STYLES: Record<Exclude<SeriesRole, 'record'>, RoleStyle> = {
  mean: { colour: palette.ink, widthPx: 2.5, dash: null },
  band: { colour: palette.inkHover, widthPx: 1, dash: '3 3' },
  target: { colour: palette.ochre, widthPx: 2, dash: null },
  target90: { colour: palette.ochre, widthPx: 1.5, dash: '7 4' },
}

const LEGEND_ROW_PX = 18
const FONT_SIZE_PX = 12
const NOTE_FONT_SIZE_PX = 11
/** Room before each legend text for its swatch. */
const LEGEND_INDENT_PX = 30

/** Damping as the legend shows it: 0.05 → "ζ = 5%". */
export function dampingLabel(dampingRatio: number): string {
  return `ζ = ${Number((dampingRatio * 100).toPrecision(6))}%`
}

/** The ordinate axis title with its unit, e.g. "PSA (g)". */
export function spectrumAxisLabel(quantity: SpectrumQuantity, unit: DisplayUnit): string {
  return `${spectrumQuantities[quantity].name}, ${quantity} (${unit})`
}

function styleFor(series: SpectrumSeries, recordIndex: number): RoleStyle {
  const base =
    series.role === 'record'
      ? {
          colour: seriesColours[recordIndex % seriesColours.length] ?? palette.ink,
          widthPx: 1.5,
          dash: null,
        }
      : ROLE_STYLES[series.role]
  const coloured = series.colour === undefined ? base : { ...base, colour: escapeXml(series.colour) }
  return series.dash === undefined ? coloured : { ...coloured, dash: series.dash }
}

function checkLengths(label: string, periodsS: ArrayLike<number>, values: ArrayLike<number>) {
  if (periodsS.length !== values.length) {
    throw new RangeError(`series "${label}" has ${periodsS.length} periods but ${values.length} values`)
  }
}

function fitDomain(values: number[], scale: AxisScale, fallback: [number, number]): [number, number] {
  if (scale === 'log') {
    const positive = values.filter((v) => v > 0 && Number.isFinite(v))
    const lo = arrayMin(positive)
    const hi = arrayMax(positive)
    if (lo === undefined || hi === undefined) return fallback
    const first = 10 ** Math.floor(Math.log10(lo))
    const last = 10 ** Math.ceil(Math.log10(hi))
    return [Number(first.toPrecision(12)), Number((last > first ? last : first * 10).toPrecision(12))]
  }
  const finite = values.filter((v) => Number.isFinite(v))
  const [lo, hi] = extent(finite)
  if (lo === undefined || hi === undefined) return fallback
  const domain = scaleLinear()
    .domain([Math.min(0, lo), hi > Math.min(0, lo) ? hi : Math.min(0, lo) + 1])
    .nice()
    .domain()
  return [domain[0] ?? 0, domain[1] ?? 1]
}

function periodExtent(data: SpectrumChartData, xScale: AxisScale): [number, number] {
  const periods: number[] = []
  for (const s of data.series) periods.push(...Array.from(s.periodsS))
  if (data.band) periods.push(...Array.from(data.band.periodsS))
  const usable = periods.filter((t) => Number.isFinite(t) && (xScale === 'linear' || t > 0))
  const lo = arrayMin(usable)
  const hi = arrayMax(usable)
  if (lo === undefined || hi === undefined || !(hi > lo)) {
    return xScale === 'log' ? [0.01, 10] : [0, 4]
  }
  return [xScale === 'linear' ? Math.min(0, lo) : lo, hi]
}

/**
 * Builds the chart. Throws a RangeError when a series' periods and values
 * differ in length or the unit does not suit the quantity.
 */
export function buildSpectrumChart(data: SpectrumChartData, options: SpectrumChartOptions): SpectrumChart {
  const quantity = spectrumQuantities[options.quantity]
  const unit = options.unit ?? quantity.defaultUnit
  checkUnit(quantity.kind, unit)
  for (const s of data.series) checkLengths(s.label, s.periodsS, s.values)
  if (data.band) {
    checkLengths(data.band.label, data.band.periodsS, data.band.lower)
    checkLengths(data.band.label, data.band.periodsS, data.band.upper)
  }
  const xKind = options.xScale ?? 'log'
  const yKind = options.yScale ?? 'linear'
  const widthPx = options.widthPx ?? 720
  const requestedHeightPx = options.heightPx ?? 440
  const id = safeId(options.id ?? 'ordinate-spectrum')

  if (data.shortfall) {
    checkLengths(data.shortfall.label, data.shortfall.periodsS, data.shortfall.lower)
    checkLengths(data.shortfall.label, data.shortfall.periodsS, data.shortfall.upper)
  }
  const legendEntries = [
    ...(data.band ? [{ kind: 'band' as const, label: data.band.label }] : []),
    ...(data.shortfall ? [{ kind: 'shortfall' as const, label: data.shortfall.label }] : []),
    ...data.series.map((s, i) => ({
      kind: 'series' as const,
      index: i,
      label: s.dampingRatio === undefined ? s.label : `${s.label}, ${dampingLabel(s.dampingRatio)}`,
    })),
  ]
  const plot: PlotRect = {
    left: 72,
    top: options.title ? 36 : 14,
    width: 0,
    height: 0,
  }
  // Legend and note wrap onto more lines rather than lose their ends (values such as "ζ = 5%").
  const legendWidthPx = widthPx - plot.left - 20
  const legend = layoutLegend(
    legendEntries.map((e) => e.label),
    {
      widthPx: legendWidthPx,
      fontSizePx: FONT_SIZE_PX,
      indentPx: LEGEND_INDENT_PX,
      minTwoColumnWidthPx: 560,
    },
  )
  const noteLines = options.note ? wrapText(options.note, legendWidthPx, NOTE_FONT_SIZE_PX) : []
  const bottomPx = 44 + (legend.lineCount + noteLines.length) * LEGEND_ROW_PX + 8
  // A long legend makes the figure taller rather than squeeze the plot below half of it.
  const heightPx = Math.max(requestedHeightPx, Math.round(plot.top + requestedHeightPx / 2 + bottomPx))
  plot.width = Math.max(40, widthPx - plot.left - 20)
  plot.height = Math.max(40, heightPx - plot.top - bottomPx)

  const toUnit = (v: number) => fromSI(v, unit)
  const converted = data.series.map((s) => Array.from(s.values, toUnit))
  const bandLower = data.band ? Array.from(data.band.lower, toUnit) : []
  const bandUpper = data.band ? Array.from(data.band.upper, toUnit) : []

  const xDomainS = options.xDomainS ?? periodExtent(data, xKind)
  const yDomain =
    options.yDomain ??
    fitDomain([...converted.flat(), ...bandLower, ...bandUpper], yKind, yKind === 'log' ? [0.001, 1] : [0, 1])
  const xRange = [plot.left, plot.left + plot.width]
  const yRange = [plot.top + plot.height, plot.top]
  const x = (xKind === 'log' ? scaleLog() : scaleLinear()).domain(xDomainS).range(xRange)
  const y = (yKind === 'log' ? scaleLog() : scaleLinear()).domain(yDomain).range(yRange)
  const xTicks: Ticks = xKind === 'log' ? logTicks(xDomainS[0], xDomainS[1]) : linearTicks(x.ticks(8))
  const yTicks: Ticks = yKind === 'log' ? logTicks(yDomain[0], yDomain[1]) : linearTicks(y.ticks(6))

  const drawable = (t: number, v: number) =>
    Number.isFinite(t) && Number.isFinite(v) && (xKind === 'linear' || t > 0) && (yKind === 'linear' || v > 0)

  const parts: string[] = []
  parts.push(
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${widthPx} ${heightPx}" width="${widthPx}" height="${heightPx}" role="img" aria-labelledby="${id}-title ${id}-desc" font-family="${escapeXml(FONT_FAMILY)}" font-size="${FONT_SIZE_PX}">`,
  )
  const titleText = options.title ?? `${options.quantity} against period`
  const seriesNames = data.series.map((s) =>
    s.dampingRatio === undefined ? s.label : `${s.label} (${dampingLabel(s.dampingRatio)})`,
  )
  const description =
    `${spectrumAxisLabel(options.quantity, unit)} against period T (s), ` +
    `${xKind} period axis from ${xDomainS[0]} to ${xDomainS[1]} s, ${yKind} ordinate axis. ` +
    (seriesNames.length > 0 ? `Curves: ${seriesNames.join('; ')}.` : 'No curves.')
  parts.push(`<title id="${id}-title">${escapeXml(titleText)}</title>`)
  parts.push(`<desc id="${id}-desc">${escapeXml(description)}</desc>`)
  parts.push(`<rect x="0" y="0" width="${widthPx}" height="${heightPx}" fill="${palette.surface}"/>`)
  parts.push(plotClipMarkup(`${id}-clip`, plot))
  // The scaling range as a tinted background band, under the grid and the curves.
  if (options.periodRange) {
    const lo = Math.max(options.periodRange.minS, xDomainS[0])
    const hi = Math.min(options.periodRange.maxS, xDomainS[1])
    if (hi > lo) {
      parts.push(
        `<rect x="${px(x(lo))}" y="${px(plot.top)}" width="${px(x(hi) - x(lo))}" height="${px(plot.height)}" fill="${palette.ochreSoft}" fill-opacity="0.7" data-role="period-range"/>`,
      )
    }
  }
  // Periods beyond the usable band of a filtered record, greyed under the grid and the curves.
  if (options.usablePeriodMaxS !== undefined && options.usablePeriodMaxS < xDomainS[1]) {
    const lo = Math.max(options.usablePeriodMaxS, xDomainS[0])
    parts.push(
      `<rect x="${px(x(lo))}" y="${px(plot.top)}" width="${px(x(xDomainS[1]) - x(lo))}" height="${px(plot.height)}" fill="${palette.gridMajor}" fill-opacity="0.45" data-role="outside-usable-band"/>`,
      `<text x="${px(plot.left + plot.width - 4)}" y="${px(plot.top + plot.height - 6)}" text-anchor="end" fill="${palette.textMuted}">${escapeXml(`Beyond the usable band (T > ${Number(options.usablePeriodMaxS.toPrecision(3))} s)`)}</text>`,
    )
  }
  parts.push(`<g>${gridMarkup(x, xTicks, y, yTicks, plot)}</g>`)

  parts.push(`<g clip-path="url(#${id}-clip)">`)
  if (data.band) {
    const periods = Array.from(data.band.periodsS)
    const indices = periods
      .map((_, i) => i)
      .filter((i) => {
        const t = periods[i] ?? NaN
        return drawable(t, bandLower[i] ?? NaN) && drawable(t, bandUpper[i] ?? NaN)
      })
    const bandPath = area<number>()
      .x((i) => x(periods[i] ?? 0))
      .y0((i) => y(bandLower[i] ?? 0))
      .y1((i) => y(bandUpper[i] ?? 0))
      .digits(2)(indices)
    if (bandPath) {
      parts.push(`<path d="${bandPath}" fill="${palette.ink}" fill-opacity="0.12" stroke="none"/>`)
      for (const edge of [bandLower, bandUpper]) {
        const d = line<number>()
          .x((i) => x(periods[i] ?? 0))
          .y((i) => y(edge[i] ?? 0))
          .digits(2)(indices)
        if (d) {
          parts.push(
            `<path d="${d}" fill="none" stroke="${palette.inkHover}" stroke-width="0.75" stroke-opacity="0.8" data-role="band-edge"/>`,
          )
        }
      }
    }
  }
  if (data.shortfall) {
    const periods = Array.from(data.shortfall.periodsS)
    const lower = Array.from(data.shortfall.lower, toUnit)
    const upper = Array.from(data.shortfall.upper, toUnit)
    const d = area<number>()
      .defined(
        (i) => drawable(periods[i] ?? NaN, lower[i] ?? NaN) && drawable(periods[i] ?? NaN, upper[i] ?? NaN),
      )
      .x((i) => x(periods[i] ?? 0))
      .y0((i) => y(lower[i] ?? 0))
      .y1((i) => y(upper[i] ?? 0))
      .digits(2)(periods.map((_, i) => i))
    if (d) {
      parts.push(
        `<path d="${d}" fill="${palette.brick}" fill-opacity="0.28" stroke="none" data-role="shortfall"/>`,
      )
    }
  }
  let recordIndex = 0
  const styles = data.series.map((s) => styleFor(s, s.role === 'record' ? recordIndex++ : 0))
  data.series.forEach((s, si) => {
    const values = converted[si] ?? []
    const periods = Array.from(s.periodsS)
    const style = styles[si] ?? ROLE_STYLES.mean
    const d = line<number>()
      .defined((i) => drawable(periods[i] ?? NaN, values[i] ?? NaN))
      .x((i) => x(periods[i] ?? 0))
      .y((i) => y(values[i] ?? 0))
      .digits(2)(periods.map((_, i) => i))
    if (!d) return
    const dash = style.dash ? ` stroke-dasharray="${escapeXml(style.dash)}"` : ''
    parts.push(
      `<path d="${d}" fill="none" stroke="${style.colour}" stroke-width="${style.widthPx}" stroke-linejoin="round"${dash}/>`,
    )
  })
  parts.push('</g>')

  if (options.periodRange) {
    const { minS, maxS, label } = options.periodRange
    for (const t of [minS, maxS]) {
      if (t < xDomainS[0] || t > xDomainS[1]) continue
      const xp = px(x(t))
      parts.push(
        `<line x1="${xp}" y1="${px(plot.top)}" x2="${xp}" y2="${px(plot.top + plot.height)}" stroke="${palette.ochre}" stroke-width="0.75" stroke-opacity="0.8"/>`,
      )
    }
    if (label) {
      const xLabel = Math.max(plot.left, Math.min(plot.left + plot.width, x(minS))) + 4
      parts.push(
        `<text x="${px(xLabel)}" y="${px(plot.top + 13)}" fill="${palette.ochrePressed}">${escapeXml(label)}</text>`,
      )
    }
  }

  parts.push(
    framedAxesMarkup(x, xTicks, y, yTicks, plot, {
      x: 'Period T (s)',
      y: spectrumAxisLabel(options.quantity, unit),
    }),
  )
  if (options.title) {
    parts.push(
      `<text x="${px(plot.left)}" y="22" fill="${palette.text}" font-size="15" font-weight="600">${escapeXml(options.title)}</text>`,
    )
  }
  if (data.series.length === 0 && !data.band) {
    parts.push(
      `<text x="${px(plot.left + plot.width / 2)}" y="${px(plot.top + plot.height / 2)}" text-anchor="middle" fill="${palette.textMuted}">No spectra to show</text>`,
    )
  }

  const legendTop = plot.top + plot.height + 52
  legendEntries.forEach((entry, i) => {
    const placed = legend.entries[i]
    if (!placed) return
    const lx = plot.left + (placed.column * legendWidthPx) / 2
    const ly = legendTop + placed.line * LEGEND_ROW_PX
    let swatch: string
    if (entry.kind === 'band') {
      swatch =
        `<rect x="${px(lx)}" y="${px(ly - 9)}" width="24" height="10" fill="${palette.ink}" fill-opacity="0.12"/>` +
        `<line x1="${px(lx)}" y1="${px(ly - 9)}" x2="${px(lx + 24)}" y2="${px(ly - 9)}" stroke="${palette.inkHover}" stroke-width="0.75"/>` +
        `<line x1="${px(lx)}" y1="${px(ly + 1)}" x2="${px(lx + 24)}" y2="${px(ly + 1)}" stroke="${palette.inkHover}" stroke-width="0.75"/>`
    } else if (entry.kind === 'shortfall') {
      swatch = `<rect x="${px(lx)}" y="${px(ly - 9)}" width="24" height="10" fill="${palette.brick}" fill-opacity="0.28"/>`
    } else {
      const style = styles[entry.index] ?? ROLE_STYLES.mean
      const dash = style.dash ? ` stroke-dasharray="${escapeXml(style.dash)}"` : ''
      swatch = `<line x1="${px(lx)}" y1="${px(ly - 4)}" x2="${px(lx + 24)}" y2="${px(ly - 4)}" stroke="${style.colour}" stroke-width="${style.widthPx}"${dash}/>`
    }
    parts.push(`<g>${swatch}${textLines(placed.lines, lx + LEGEND_INDENT_PX, ly, palette.text)}</g>`)
  })
  if (noteLines.length > 0) {
    const ny = legendTop + legend.lineCount * LEGEND_ROW_PX
    parts.push(textLines(noteLines, plot.left, ny, palette.textMuted, NOTE_FONT_SIZE_PX))
  }
  parts.push('</svg>')

  return {
    svg: parts.join(''),
    frame: { widthPx, heightPx, plot, xScale: xKind, yScale: yKind, xDomainS, yDomain, unit },
  }
}

/**
 * One SVG text element per line, LEGEND_ROW_PX apart. Separate elements rather than tspans,
 * so that the PDF exporter (svg-to-pdfkit) and pdftotext read each line whole.
 */
function textLines(lines: string[], x: number, y: number, fill: string, fontSizePx?: number): string {
  const size = fontSizePx === undefined ? '' : ` font-size="${fontSizePx}"`
  return lines
    .map(
      (l, i) =>
        `<text x="${px(x)}" y="${px(y + i * LEGEND_ROW_PX)}" fill="${fill}"${size}>${escapeXml(l)}</text>`,
    )
    .join('')
}

/** The chart as SVG text; see {@link buildSpectrumChart}. */
export function spectrumChartSvg(data: SpectrumChartData, options: SpectrumChartOptions): string {
  return buildSpectrumChart(data, options).svg
}
